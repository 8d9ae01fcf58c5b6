/**
 * Writes a built-in model as an ONNX file (ModelProto bytes), so that what the gate measured can be
 * run anywhere onnxruntime runs, and read back by loadOnnxModel.
 *
 * Every exported model has one input `X`, float64 [N, F], with the feature order in metadata_props
 * `plumbline.features` (FEATURES_METADATA_KEY). Missing values are NaN in X.
 * - Boosted trees: ai.onnx.ml TreeEnsembleRegressor (opset ml 3) with BRANCH_LEQ nodes (true = left),
 *   nodes_missing_value_tracks_true = missingGoesLeft, base value = baseScore, and thresholds, leaf
 *   values and base value as double tensors (the `_as_tensor` attributes), so that with a double
 *   input the splits compare exactly as BoostedModel does. The operator's output is float32, so
 *   predictions carry float32 rounding (relative 6e-8).
 * - Linear models, all in float64: numeric columns get their training fill where NaN (IsNaN, Where),
 *   then MatMul with the coefficients (0 for categorical columns) and Add the intercept. Each
 *   categorical column is taken out (Gather), and an ai.onnx.ml LabelEncoder maps its codes 0..K-1 to
 *   their contributions, anything else (NaN, other codes) to the term's fill, as LinearModel does;
 *   LabelEncoder works in float32, so those contributions carry float32 rounding.
 * - Regression writes the score as `prediction` [N, 1]. Binary applies Sigmoid to the score and
 *   writes `probabilities` [N, 2] = [1 - p, p], the layout loadOnnxModel expects.
 * Opsets: ai.onnx 15, ai.onnx.ml 3; IR version 8 (what onnx 1.12 writes; onnxruntime 1.30 reads it).
 * Cost: O(total tree nodes) to build the attribute lists.
 */
import { BoostedModel } from './gbt/boosted-model.ts'
import type { Tree } from './gbt/tree.ts'
import { LinearModel } from './linear/linear-model.ts'
import {
  encodeOnnxModel,
  FEATURES_METADATA_KEY,
  OnnxAttributeType,
  OnnxDataType,
  type OnnxAttribute,
  type OnnxNode,
  type OnnxTensor,
  type OnnxValueInfo,
} from './onnx-proto.ts'

const ML_DOMAIN = 'ai.onnx.ml'
const OPSETS = [
  { domain: '', version: 15 },
  { domain: ML_DOMAIN, version: 3 },
]
const IR_VERSION = 8

export function exportOnnx(model: BoostedModel | LinearModel): Uint8Array {
  if (model.task === 'multiclass') throw new RangeError('exportOnnx: multiclass models are not exported')
  if (model instanceof BoostedModel) return exportBoosted(model)
  if (model instanceof LinearModel) return exportLinear(model)
  throw new RangeError(`exportOnnx: cannot export a model of kind '${(model as { kind?: string }).kind}'`)
}

function exportBoosted(model: BoostedModel): Uint8Array {
  const { ensemble } = model
  const width = ensemble.featureNames.length
  for (const [t, tree] of ensemble.trees.entries()) {
    for (let i = 0; i < tree.feature.length; i++) {
      if (tree.feature[i] >= width) throw new RangeError(`exportOnnx: tree ${t} node ${i} splits on feature ${tree.feature[i]} of ${width}`)
    }
  }
  const task = ensemble.task as 'binary' | 'regression'
  const scoreName = task === 'binary' ? 'raw_score' : 'prediction'
  const nodes: OnnxNode[] = [
    {
      opType: 'TreeEnsembleRegressor',
      domain: ML_DOMAIN,
      input: ['X'],
      output: [scoreName],
      name: 'trees',
      attribute: [
        ...treeAttributes(ensemble.trees),
        int('n_targets', 1),
        string('aggregate_function', 'SUM'),
        string('post_transform', 'NONE'),
        doubles('base_values_as_tensor', [ensemble.baseScore]),
      ],
    },
  ]
  const initializer: OnnxTensor[] = []
  if (task === 'binary') nodes.push(...probabilityNodes(scoreName, OnnxDataType.FLOAT, initializer))
  return writeModel(ensemble.featureNames, nodes, initializer, output(task, OnnxDataType.FLOAT))
}

function exportLinear(model: LinearModel): Uint8Array {
  const { state } = model
  const width = state.featureNames.length
  const scoreName = state.task === 'binary' ? 'score' : 'prediction'
  // A categorical term without categories always contributes its fill: fold it into the intercept.
  const constant = state.terms.reduce((sum, term) => (term.kind === 'categorical' && term.coefficients.length === 0 ? sum + term.fill : sum), 0)
  const initializer: OnnxTensor[] = [
    doubleTensor('fills', [width], state.terms.map((term) => (term.kind === 'numeric' ? term.fill : 0))),
    doubleTensor('coefficients', [width, 1], state.terms.map((term) => (term.kind === 'numeric' ? term.coefficient : 0))),
    doubleTensor('intercept', [1], [state.intercept + constant]),
  ]
  const nodes: OnnxNode[] = [
    { opType: 'IsNaN', input: ['X'], output: ['missing'], name: 'missing' },
    { opType: 'Where', input: ['missing', 'fills', 'X'], output: ['filled'], name: 'fill' },
    { opType: 'MatMul', input: ['filled', 'coefficients'], output: ['numeric_part'], name: 'numeric_terms' },
  ]
  let score = 'numeric_part'
  const add = (term: string, name: string) => {
    const next = `${name}_sum`
    nodes.push({ opType: 'Add', input: [score, term], output: [next], name: next })
    score = next
  }
  state.terms.forEach((term, j) => {
    if (term.kind !== 'categorical' || term.coefficients.length === 0) return
    const name = `categorical_${j}`
    initializer.push({ name: `${name}_index`, dims: [1], dataType: OnnxDataType.INT64, int64Data: [j] })
    nodes.push(
      { opType: 'Gather', input: ['X', `${name}_index`], output: [`${name}_code`], name: `${name}_take`, attribute: [int('axis', 1)] },
      { opType: 'Cast', input: [`${name}_code`], output: [`${name}_code_float`], name: `${name}_to_float`, attribute: [int('to', OnnxDataType.FLOAT)] },
      {
        opType: 'LabelEncoder',
        domain: ML_DOMAIN,
        input: [`${name}_code_float`],
        output: [`${name}_part_float`],
        name: `${name}_lookup`,
        attribute: [
          floats('keys_floats', term.coefficients.map((_, code) => code)),
          floats('values_floats', [...term.coefficients]),
          float('default_float', term.fill),
        ],
      },
      { opType: 'Cast', input: [`${name}_part_float`], output: [`${name}_part`], name: `${name}_to_double`, attribute: [int('to', OnnxDataType.DOUBLE)] },
    )
    add(`${name}_part`, name)
  })
  nodes.push({ opType: 'Add', input: [score, 'intercept'], output: [scoreName], name: 'intercept' })
  if (state.task === 'binary') nodes.push(...probabilityNodes(scoreName, OnnxDataType.DOUBLE, initializer))
  return writeModel(state.featureNames, nodes, initializer, output(state.task as 'binary' | 'regression', OnnxDataType.DOUBLE))
}

/** The nodes_* and target_* attributes of TreeEnsembleRegressor for all trees, node ids as in Tree. */
function treeAttributes(trees: readonly Tree[]): OnnxAttribute[] {
  const treeIds: number[] = []
  const nodeIds: number[] = []
  const featureIds: number[] = []
  const modes: string[] = []
  const trueIds: number[] = []
  const falseIds: number[] = []
  const missingTrue: number[] = []
  const thresholds: number[] = []
  const targetTreeIds: number[] = []
  const targetNodeIds: number[] = []
  const targetWeights: number[] = []
  trees.forEach((tree, t) => {
    for (let i = 0; i < tree.feature.length; i++) {
      const isLeaf = tree.feature[i] < 0
      treeIds.push(t)
      nodeIds.push(i)
      featureIds.push(isLeaf ? 0 : tree.feature[i])
      modes.push(isLeaf ? 'LEAF' : 'BRANCH_LEQ')
      trueIds.push(isLeaf ? 0 : tree.left[i])
      falseIds.push(isLeaf ? 0 : tree.right[i])
      missingTrue.push(isLeaf ? 0 : tree.missingGoesLeft[i])
      thresholds.push(isLeaf ? 0 : tree.threshold[i])
      if (isLeaf) {
        targetTreeIds.push(t)
        targetNodeIds.push(i)
        targetWeights.push(tree.value[i])
      }
    }
  })
  return [
    ints('nodes_treeids', treeIds),
    ints('nodes_nodeids', nodeIds),
    ints('nodes_featureids', featureIds),
    strings('nodes_modes', modes),
    ints('nodes_truenodeids', trueIds),
    ints('nodes_falsenodeids', falseIds),
    ints('nodes_missing_value_tracks_true', missingTrue),
    doubles('nodes_values_as_tensor', thresholds),
    ints('target_treeids', targetTreeIds),
    ints('target_nodeids', targetNodeIds),
    ints('target_ids', new Array(targetTreeIds.length).fill(0)),
    doubles('target_weights_as_tensor', targetWeights),
  ]
}

/** p = Sigmoid(score) [N, 1]; probabilities = Concat(1 - p, p) [N, 2]. */
function probabilityNodes(scoreName: string, elemType: number, initializer: OnnxTensor[]): OnnxNode[] {
  initializer.push(elemType === OnnxDataType.DOUBLE ? doubleTensor('one', [1], [1]) : { name: 'one', dims: [1], dataType: elemType, floatData: [1] })
  return [
    { opType: 'Sigmoid', input: [scoreName], output: ['positive'], name: 'logistic' },
    { opType: 'Sub', input: ['one', 'positive'], output: ['negative'], name: 'complement' },
    { opType: 'Concat', input: ['negative', 'positive'], output: ['probabilities'], name: 'columns', attribute: [int('axis', 1)] },
  ]
}

function writeModel(featureNames: readonly string[], node: OnnxNode[], initializer: OnnxTensor[], output: OnnxValueInfo): Uint8Array {
  return encodeOnnxModel({
    irVersion: IR_VERSION,
    producerName: 'plumbline',
    opsetImport: OPSETS,
    metadataProps: [{ key: FEATURES_METADATA_KEY, value: JSON.stringify(featureNames) }],
    graph: {
      name: 'plumbline_model',
      node,
      initializer,
      input: [tensorInfo('X', OnnxDataType.DOUBLE, ['N', featureNames.length])],
      output: [output],
    },
  })
}

const output = (task: 'binary' | 'regression', elemType: number) =>
  task === 'binary' ? tensorInfo('probabilities', elemType, ['N', 2]) : tensorInfo('prediction', elemType, ['N', 1])

function tensorInfo(name: string, elemType: number, dims: Array<number | string>): OnnxValueInfo {
  return {
    name,
    type: {
      tensorType: {
        elemType,
        shape: { dim: dims.map((d) => (typeof d === 'number' ? { dimValue: d } : { dimParam: d })) },
      },
    },
  }
}

const encoder = new TextEncoder()
const int = (name: string, i: number): OnnxAttribute => ({ name, type: OnnxAttributeType.INT, i })
const float = (name: string, f: number): OnnxAttribute => ({ name, type: OnnxAttributeType.FLOAT, f })
const floats = (name: string, values: number[]): OnnxAttribute => ({ name, type: OnnxAttributeType.FLOATS, floats: values })
const ints = (name: string, values: number[]): OnnxAttribute => ({ name, type: OnnxAttributeType.INTS, ints: values })
const string = (name: string, s: string): OnnxAttribute => ({ name, type: OnnxAttributeType.STRING, s: encoder.encode(s) })
const strings = (name: string, values: string[]): OnnxAttribute => ({
  name,
  type: OnnxAttributeType.STRINGS,
  strings: values.map((v) => encoder.encode(v)),
})
const doubleTensor = (name: string, dims: number[], values: number[]): OnnxTensor => ({ name, dims, dataType: OnnxDataType.DOUBLE, doubleData: values })
const doubles = (name: string, values: number[]): OnnxAttribute => ({
  name,
  type: OnnxAttributeType.TENSOR,
  t: doubleTensor(name, [values.length], values),
})
