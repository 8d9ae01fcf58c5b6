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
import type { OnnxOutputPlan } from './plan-onnx-output.ts'

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

/** The replacement fast path over the trees (and, with nothing replaced, their plain prediction). */
export function createOnnxTreePredictor(trees: OnnxTrees, base: FeatureMatrix): ReplacementPredictor | undefined {
  return 'classes' in trees ? createClassEnsemblesPredictor(trees, base) : createTreeReplacementPredictor(trees, base)
}
