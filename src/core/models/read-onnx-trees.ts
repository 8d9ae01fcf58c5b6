/**
 * The tree ensemble inside a loaded ONNX model that plumbline can evaluate itself, if there is one:
 * one score per row (parseOnnxTreeEnsemble: regressors, two-class classifiers) or one ensemble per
 * class (parseOnnxClassEnsembles: TreeEnsembleClassifier over K >= 3 classes with post_transform NONE
 * or SOFTMAX), ordered as the output plan reads the model's columns. Only a model fed one [N, F]
 * matrix qualifies. Pure; any decoding trouble means "not readable" (onnxruntime has accepted the
 * file, and keeps it). The caller still checks the trees against onnxruntime before trusting them.
 */
import type { FeatureMatrix } from '../data/dataset.ts'
import type { ReplacementPredictor } from './model.ts'
import { createClassEnsemblesPredictor, type ClassEnsembles } from './gbt/class-ensembles-predictor.ts'
import { createTreeReplacementPredictor, type EvaluableEnsemble } from './gbt/replacement-predictor.ts'
import { parseOnnxClassEnsembles } from './parse-onnx-class-ensembles.ts'
import { parseOnnxTreeEnsemble } from './parse-onnx-tree-ensemble.ts'
import type { OnnxInputPlan } from './plan-onnx-inputs.ts'
import { checkTreeOutput, type OnnxOutputPlan } from './plan-onnx-output.ts'

export type OnnxTrees = EvaluableEnsemble | ClassEnsembles

export function readOnnxTrees(bytes: Uint8Array, inputs: OnnxInputPlan, output: OnnxOutputPlan): OnnxTrees | undefined {
  if (inputs.kind !== 'matrix') return undefined
  const { featureNames } = inputs
  try {
    if (output.kind === 'multiclass') {
      const parsed = parseOnnxClassEnsembles(bytes, { outputName: output.name, classCount: output.classes.length })
      if (!parsed.ok || parsed.width > featureNames.length) return undefined
      return {
        classes: output.columns.map((column) => ({ ...parsed.classes[column], featureNames })),
        link: parsed.postTransform === 'SOFTMAX' ? 'softmax' : 'none',
      }
    }
    const parsed = parseOnnxTreeEnsemble(bytes, {
      task: output.kind,
      outputName: output.name,
      positiveColumn: output.kind === 'binary' ? output.positive : undefined,
    })
    return parsed.ok && parsed.width <= featureNames.length ? { ...parsed.ensemble, featureNames } : undefined
  } catch {
    return undefined
  }
}

/**
 * The replacement fast path over the trees (and, with nothing replaced, their plain prediction), its
 * every output held to checkTreeOutput's rule as predict's are: a forest's summed float32 fractions
 * can land a few units in the last place above 1 on rows the first check never saw, and the metrics
 * refuse anything outside [0, 1].
 */
export function createOnnxTreePredictor(trees: OnnxTrees, base: FeatureMatrix, output: OnnxOutputPlan): ReplacementPredictor | undefined {
  const inner = 'classes' in trees ? createClassEnsemblesPredictor(trees, base) : createTreeReplacementPredictor(trees, base)
  if (!inner) return undefined
  const checked = (values: Float64Array) => checkTreeOutput(output, values)
  const many = inner.predictMany?.bind(inner)
  return {
    rows: inner.rows,
    predict: (replaced, draws) => checked(inner.predict(replaced, draws)),
    ...(many ? { predictMany: (units, draws) => many(units, draws).map(checked) } : {}),
  }
}
