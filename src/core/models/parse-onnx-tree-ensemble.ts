/**
 * Reads an ONNX graph that is one ai.onnx.ml tree ensemble over one [N, F] float input into the
 * plumbline tree evaluator's form (EvaluableEnsemble), so a loaded gradient-boosting or forest model
 * gets the same fast permutation path as the built-in learner. Pure: bytes in, trees out.
 *
 * Graphs understood (anything else returns a reason and the model stays with onnxruntime alone):
 * - regression: TreeEnsembleRegressor (n_targets 1, aggregate SUM or AVERAGE, post_transform NONE)
 *   reading the graph input, writing the graph output, through Identity or Cast-to-float nodes only;
 * - binary, our exporter's form: that regressor's score through Sigmoid, then Concat(1 − p, p);
 * - binary: TreeEnsembleClassifier with two classes and post_transform NONE (forests: summed leaf
 *   weights as probabilities) or LOGISTIC (boosted classifiers), with leaf weights for both class
 *   ids or, for LOGISTIC, for class id 0 only; its probability output read directly, by the rule
 *   onnxruntime 1.30 applies (see classifierTrees: it is not the operator's text, measured: with
 *   leaf weights (0.3, 0.5) and two base values (0.1, 0.4) LOGISTIC gives σ(0.4 + 0.3) for class 1).
 *   SOFTMAX and PROBIT are left to onnxruntime.
 * Node modes BRANCH_LEQ, BRANCH_LT, BRANCH_GTE and BRANCH_GT become "value <= t goes left" with the
 * children swapped where the test is "greater" and t moved to the next double below for the strict
 * forms (v < t is v <= nextDown(t) for every double v). A missing value (NaN) follows the true branch
 * when nodes_missing_value_tracks_true is 1 and the false branch otherwise, as onnxruntime does.
 * A float32 input makes the evaluator round inputs, and thresholds, to float32, as onnxruntime
 * compares in the input's type; leaf sums are in double, where onnxruntime writes float32 (so
 * predictions agree to float32 rounding, and routing agrees exactly).
 * Edges: BRANCH_EQ / BRANCH_NEQ, several targets, the classifier forms classifierTrees lists as
 * unread, and any other node between input and output return a reason instead of trees.
 * Cost: O(nodes) after protobuf decoding.
 */
import type { EvaluableEnsemble } from './gbt/replacement-predictor.ts'
import type { Tree } from './gbt/tree.ts'
import { OnnxDataType, onnxProto } from './onnx-proto.ts'

export type ParsedTreeEnsemble =
  | { readonly ok: true; readonly ensemble: Omit<EvaluableEnsemble, 'featureNames'>; readonly width: number; readonly operator: string }
  | { readonly ok: false; readonly reason: string }

export interface Attribute {
  name?: string
  type?: number
  f?: number
  i?: number
  s?: Uint8Array
  t?: { dataType?: number; floatData?: number[]; doubleData?: number[]; rawData?: Uint8Array; dims?: number[] }
  floats?: number[]
  ints?: number[]
  strings?: Uint8Array[]
}
export interface Node {
  input?: string[]
  output?: string[]
  opType?: string
  domain?: string
  attribute?: Attribute[]
}
export interface ValueInfo {
  name?: string
  type?: { tensorType?: { elemType?: number; shape?: { dim?: { dimValue?: number; dimParam?: string }[] } } }
}

const text = new TextDecoder()
const no = (reason: string): ParsedTreeEnsemble => ({ ok: false, reason })

/**
 * `outputName` is the output the caller reads (the regression value, or the class probabilities);
 * `positiveColumn` the probability column of the positive class (binary). Returns the ensemble
 * whose prediction is that column, or why not.
 */
export function parseOnnxTreeEnsemble(
  bytes: Uint8Array,
  target: { readonly task: 'binary' | 'regression'; readonly outputName: string; readonly positiveColumn?: number },
): ParsedTreeEnsemble {
  const graph = readTreeGraph(bytes)
  if (!graph.ok) return graph
  const { input, elemType, producer, source } = graph
  const end = source(target.outputName)
  let operator: Node | undefined
  let link: 'identity' | 'logistic' = 'identity'
  if (target.task === 'regression') {
    if (end.node?.opType !== 'TreeEnsembleRegressor') return no(`the output '${target.outputName}' does not come from a TreeEnsembleRegressor`)
    operator = end.node
  } else if (end.node?.opType === 'Concat') {
    // Our exporter: Concat(Sub(1, Sigmoid(s)), Sigmoid(s)) with s from a TreeEnsembleRegressor.
    const parts = end.node.input ?? []
    const positive = parts[target.positiveColumn ?? 1]
    const sigmoid = producer.get(positive)
    if (parts.length !== 2 || sigmoid?.opType !== 'Sigmoid' || (target.positiveColumn ?? 1) !== 1) {
      return no('the probabilities are a Concat this reader does not know')
    }
    const complement = producer.get(parts[0])
    if (complement?.opType !== 'Sub' || complement.input?.[1] !== positive) return no('the probabilities are a Concat this reader does not know')
    const score = source(sigmoid.input![0])
    if (score.node?.opType !== 'TreeEnsembleRegressor') return no('the Sigmoid does not read a TreeEnsembleRegressor')
    operator = score.node
    link = 'logistic'
  } else if (end.node?.opType === 'TreeEnsembleClassifier' && end.node.output?.[1] === end.name) {
    operator = end.node
  } else return no(`the output '${target.outputName}' does not come from a tree ensemble this reader knows`)

  if (operator.domain !== 'ai.onnx.ml') return no(`${operator.opType} is not in the ai.onnx.ml domain`)
  const reaches = source(operator.input?.[0] ?? '')
  if (reaches.node !== undefined || reaches.name !== input.name) return no(`${operator.opType} does not read the graph input directly`)
  const attributes = new Map((operator.attribute ?? []).map((a) => [a.name ?? '', a]))
  const float32Inputs = elemType === OnnxDataType.FLOAT
  const parsed = operator.opType === 'TreeEnsembleRegressor'
    ? regressorTrees(attributes, float32Inputs)
    : classifierTrees(attributes, target.positiveColumn ?? 1, float32Inputs)
  if (!parsed.ok) return parsed
  if (operator.opType === 'TreeEnsembleClassifier') link = parsed.link
  return {
    ok: true,
    operator: operator.opType!,
    width: parsed.width,
    ensemble: { baseScore: parsed.baseScore, trees: parsed.trees, link, float32Inputs },
  }
}

/** The graph a tree reader walks: its one [N, F] float input, each value's producer, and `source`, which follows Identity and Cast-to-float/double back from a value. */
export type TreeGraph =
  | {
      readonly ok: true
      readonly input: ValueInfo
      readonly elemType: number
      readonly producer: ReadonlyMap<string, Node>
      readonly source: (name: string) => { name: string; node: Node | undefined }
    }
  | { readonly ok: false; readonly reason: string }

export function readTreeGraph(bytes: Uint8Array): TreeGraph {
  const decoded = onnxProto.ModelProto.toObject(onnxProto.ModelProto.decode(bytes), { longs: Number, arrays: true, bytes: Uint8Array }) as {
    graph?: { node?: Node[]; input?: ValueInfo[]; initializer?: { name?: string }[] }
  }
  const graph = decoded.graph
  if (!graph) return { ok: false, reason: 'the file has no graph' }
  const initialized = new Set((graph.initializer ?? []).map((t) => t.name))
  const inputs = (graph.input ?? []).filter((v) => !initialized.has(v.name))
  if (inputs.length !== 1) return { ok: false, reason: `the graph has ${inputs.length} inputs, not one [N, F] matrix` }
  const input = inputs[0]
  const elemType = input.type?.tensorType?.elemType
  if (elemType !== OnnxDataType.FLOAT && elemType !== OnnxDataType.DOUBLE) return { ok: false, reason: 'the input is not a float or double tensor' }
  const producer = new Map<string, Node>()
  for (const node of graph.node ?? []) for (const out of node.output ?? []) producer.set(out, node)
  const source = (name: string): { name: string; node: Node | undefined } => {
    let node = producer.get(name)
    while (node && node.domain !== 'ai.onnx.ml' && (node.opType === 'Identity' || isFloatCast(node))) {
      name = node.input![0]
      node = producer.get(name)
    }
    return { name, node }
  }
  return { ok: true, input, elemType, producer, source }
}

function isFloatCast(node: Node): boolean {
  if (node.opType !== 'Cast') return false
  const to = node.attribute?.find((a) => a.name === 'to')?.i
  return to === OnnxDataType.FLOAT || to === OnnxDataType.DOUBLE
}

type Trees = { ok: true; trees: Tree[]; baseScore: number; width: number; link: 'identity' | 'logistic' } | { ok: false; reason: string }

function regressorTrees(attributes: Map<string, Attribute>, round: boolean): Trees {
  const post = stringOf(attributes, 'post_transform') ?? 'NONE'
  if (post !== 'NONE') return { ok: false, reason: `TreeEnsembleRegressor post_transform ${post}` }
  const targets = attributes.get('n_targets')?.i ?? 1
  if (targets !== 1) return { ok: false, reason: `TreeEnsembleRegressor with ${targets} targets` }
  const base = numbersOf(attributes, 'base_values') ?? [0]
  const leaves = leafWeights(attributes, 'target', (id) => id === 0)
  if (!leaves.ok) return leaves
  return buildTrees(attributes, leaves.weights, base[0] ?? 0, stringOf(attributes, 'aggregate_function') ?? 'SUM', 'identity', round)
}

/**
 * A two-class TreeEnsembleClassifier as one score per row and a link, by the rule onnxruntime 1.30
 * applies (tree_ensemble_aggregator.h, FinalizeScores and write_scores), which this reader follows
 * rather than the operator's text. With s_c the summed leaf weights of class id c and b the
 * base_values, the probability of class 1 is
 * - weights for both class ids, two base values: f(b_1 + s_0), class 1's own weights unused, and
 *   class 0's column is f(−(b_1 + s_0));
 * - weights for both class ids, at most one base value: f(s_1) (b_0 goes to class 0 only, whose
 *   column is f(s_0 + b_0));
 * - weights for class id 0 only (the converters' form of a boosted binary classifier), at most one
 *   base value, LOGISTIC: σ(s_0 + b_0), class 0's column σ(−(s_0 + b_0));
 * where f is the identity for NONE and σ for LOGISTIC. Measured on onnxruntime-node 1.30 with
 * single trees and checked on random ensembles (test/adapters/onnx/onnx-tree-evaluator.test.ts).
 * Anything else (weights for class id 1 only, or for class 0 only with two base values or NONE,
 * whose columns onnxruntime fills with constants or by a rule that depends on the signs of all
 * weights; PROBIT, which onnxruntime turns into a normal quantile rather than a probability; SOFTMAX)
 * returns a reason and stays with onnxruntime.
 */
function classifierTrees(attributes: Map<string, Attribute>, positive: number, round: boolean): Trees {
  const labels = attributes.get('classlabels_strings')?.strings?.length ?? attributes.get('classlabels_int64s')?.ints?.length ?? 0
  if (labels !== 2) return { ok: false, reason: `TreeEnsembleClassifier with ${labels} classes` }
  const ids = new Set(attributes.get('class_ids')?.ints ?? [])
  const post = stringOf(attributes, 'post_transform') ?? 'NONE'
  if (post !== 'NONE' && post !== 'LOGISTIC') return { ok: false, reason: `TreeEnsembleClassifier post_transform ${post}` }
  const link = post === 'LOGISTIC' ? 'logistic' : 'identity'
  const base = numbersOf(attributes, 'base_values') ?? []
  if (base.length > 2) return { ok: false, reason: `TreeEnsembleClassifier with ${base.length} base values for two classes` }
  const bothClasses = ids.size === 2 && ids.has(0) && ids.has(1)
  const classZeroOnly = ids.size === 1 && ids.has(0) && post === 'LOGISTIC' && base.length < 2
  if (!bothClasses && !classZeroOnly) {
    return { ok: false, reason: `TreeEnsembleClassifier, post_transform ${post}, with weights for class ids ${[...ids].sort().join(', ') || 'none'} and ${base.length} base values` }
  }
  // The score of class 1 (its column is f(score)), then negated for class 0 where onnxruntime does so.
  let scoreClass: number
  let offset: number
  let negateForClassZero: boolean
  if (bothClasses && base.length === 2) [scoreClass, offset, negateForClassZero] = [0, base[1], true]
  else if (bothClasses) [scoreClass, offset, negateForClassZero] = positive === 1 ? [1, 0, false] : [0, base[0] ?? 0, false]
  else [scoreClass, offset, negateForClassZero] = [0, base[0] ?? 0, true]
  const sign = positive === 0 && negateForClassZero ? -1 : 1
  const leaves = leafWeights(attributes, 'class', (id) => id === scoreClass, () => sign)
  if (!leaves.ok) return leaves
  return buildTrees(attributes, leaves.weights, sign * offset, 'SUM', link, round)
}

/** Σ weights per (tree id, node id) for the targets kept, each times its sign. */
export function leafWeights(
  attributes: Map<string, Attribute>,
  prefix: 'target' | 'class',
  keep: (id: number) => boolean,
  sign: (id: number) => number = () => 1,
): { ok: true; weights: Map<string, number> } | { ok: false; reason: string } {
  const treeIds = attributes.get(`${prefix}_treeids`)?.ints ?? []
  const nodeIds = attributes.get(`${prefix}_nodeids`)?.ints ?? []
  const ids = attributes.get(`${prefix}_ids`)?.ints ?? []
  const weights = numbersOf(attributes, `${prefix}_weights`) ?? []
  if (treeIds.length !== nodeIds.length || treeIds.length !== ids.length || treeIds.length !== weights.length) {
    return { ok: false, reason: `the ${prefix}_* attributes differ in length` }
  }
  const out = new Map<string, number>()
  for (let k = 0; k < treeIds.length; k++) {
    if (!keep(ids[k])) continue
    const key = `${treeIds[k]}:${nodeIds[k]}`
    out.set(key, (out.get(key) ?? 0) + sign(ids[k]) * weights[k])
  }
  return { ok: true, weights: out }
}

export function buildTrees(
  attributes: Map<string, Attribute>,
  weights: Map<string, number>,
  baseScore: number,
  aggregate: string,
  link: 'identity' | 'logistic',
  /** Float32 input: thresholds compare in float32 (rounded before the strict forms move them). */
  round: boolean,
): Trees {
  if (aggregate !== 'SUM' && aggregate !== 'AVERAGE') return { ok: false, reason: `aggregate_function ${aggregate}` }
  const treeIds = attributes.get('nodes_treeids')?.ints ?? []
  const nodeIds = attributes.get('nodes_nodeids')?.ints ?? []
  const featureIds = attributes.get('nodes_featureids')?.ints ?? []
  const modes = (attributes.get('nodes_modes')?.strings ?? []).map((s) => text.decode(s))
  const values = numbersOf(attributes, 'nodes_values') ?? []
  const trueIds = attributes.get('nodes_truenodeids')?.ints ?? []
  const falseIds = attributes.get('nodes_falsenodeids')?.ints ?? []
  const tracks = attributes.get('nodes_missing_value_tracks_true')?.ints ?? []
  const count = treeIds.length
  if ([nodeIds, featureIds, modes, values, trueIds, falseIds].some((list) => list.length !== count)) {
    return { ok: false, reason: 'the nodes_* attributes differ in length' }
  }
  const byTree = new Map<number, number[]>()
  for (let k = 0; k < count; k++) {
    const list = byTree.get(treeIds[k]) ?? []
    list.push(k)
    byTree.set(treeIds[k], list)
  }
  const scale = aggregate === 'AVERAGE' ? 1 / byTree.size : 1
  const trees: Tree[] = []
  let width = 0
  for (const [treeId, rows] of [...byTree].sort((a, b) => a[0] - b[0])) {
    const index = new Map<number, number>()
    rows.forEach((k, at) => index.set(nodeIds[k], at))
    const m = rows.length
    const tree = {
      feature: new Int32Array(m).fill(-1),
      threshold: new Float64Array(m),
      left: new Int32Array(m).fill(-1),
      right: new Int32Array(m).fill(-1),
      missingGoesLeft: new Uint8Array(m),
      value: new Float64Array(m),
    }
    for (let at = 0; at < m; at++) {
      const k = rows[at]
      const mode = modes[k]
      if (mode === 'LEAF') {
        tree.value[at] = (weights.get(`${treeId}:${nodeIds[k]}`) ?? 0) * scale
        continue
      }
      const yes = index.get(trueIds[k])
      const no = index.get(falseIds[k])
      if (yes === undefined || no === undefined) return { ok: false, reason: `tree ${treeId} node ${nodeIds[k]} points at a node it does not have` }
      const missingTrue = (tracks[k] ?? 0) === 1
      const t = round ? Math.fround(values[k]) : values[k]
      let lessEqual: number
      let trueIsLeft: boolean
      if (mode === 'BRANCH_LEQ') [lessEqual, trueIsLeft] = [t, true]
      else if (mode === 'BRANCH_LT') [lessEqual, trueIsLeft] = [nextDown(t), true]
      else if (mode === 'BRANCH_GT') [lessEqual, trueIsLeft] = [t, false]
      else if (mode === 'BRANCH_GTE') [lessEqual, trueIsLeft] = [nextDown(t), false]
      else return { ok: false, reason: `node mode ${mode}` }
      tree.feature[at] = featureIds[k]
      width = Math.max(width, featureIds[k] + 1)
      tree.threshold[at] = lessEqual
      tree.left[at] = trueIsLeft ? yes : no
      tree.right[at] = trueIsLeft ? no : yes
      tree.missingGoesLeft[at] = missingTrue === trueIsLeft ? 1 : 0
    }
    if (!isTree(tree)) return { ok: false, reason: `tree ${treeId} is not a tree rooted at its first node` }
    trees.push(reorderRootFirst(tree))
  }
  return { ok: true, trees, baseScore, width, link }
}

/** Every node reachable once from node 0 (after reordering, the root is the node no other points at). */
function isTree(tree: Tree): boolean {
  const m = tree.feature.length
  const parents = new Int32Array(m)
  for (let i = 0; i < m; i++) {
    if (tree.feature[i] < 0) continue
    parents[tree.left[i]]++
    parents[tree.right[i]]++
  }
  let roots = 0
  for (let i = 0; i < m; i++) {
    if (parents[i] > 1) return false
    if (parents[i] === 0) roots++
  }
  return roots === 1
}

/** The tree with its root (the node nobody points at) at index 0, by swapping two ids. */
function reorderRootFirst(tree: Tree): Tree {
  const m = tree.feature.length
  const pointed = new Uint8Array(m)
  for (let i = 0; i < m; i++) {
    if (tree.feature[i] < 0) continue
    pointed[tree.left[i]] = 1
    pointed[tree.right[i]] = 1
  }
  const root = pointed.indexOf(0)
  if (root === 0) return tree
  const swap = (i: number) => (i === root ? 0 : i === 0 ? root : i)
  const out = {
    feature: Int32Array.from({ length: m }, (_, i) => tree.feature[swap(i)]),
    threshold: Float64Array.from({ length: m }, (_, i) => tree.threshold[swap(i)]),
    left: Int32Array.from({ length: m }, (_, i) => (tree.left[swap(i)] < 0 ? -1 : swap(tree.left[swap(i)]))),
    right: Int32Array.from({ length: m }, (_, i) => (tree.right[swap(i)] < 0 ? -1 : swap(tree.right[swap(i)]))),
    missingGoesLeft: Uint8Array.from({ length: m }, (_, i) => tree.missingGoesLeft[swap(i)]),
    value: Float64Array.from({ length: m }, (_, i) => tree.value[swap(i)]),
  }
  return out
}

/** The largest double below x (x finite). */
function nextDown(x: number): number {
  if (x !== x || x === -Infinity) return x
  if (x === 0) return -Number.MIN_VALUE
  const buffer = new Float64Array([x])
  const bits = new BigInt64Array(buffer.buffer)
  bits[0] += x > 0 ? -1n : 1n
  return buffer[0]
}

export function stringOf(attributes: Map<string, Attribute>, name: string): string | undefined {
  const s = attributes.get(name)?.s
  return s ? text.decode(s) : undefined
}

/** A float list attribute, or its `_as_tensor` double form (which takes precedence). */
export function numbersOf(attributes: Map<string, Attribute>, name: string): number[] | undefined {
  const tensor = attributes.get(`${name}_as_tensor`)?.t
  if (tensor) {
    if (tensor.doubleData && tensor.doubleData.length > 0) return tensor.doubleData
    if (tensor.floatData && tensor.floatData.length > 0) return tensor.floatData
    if (tensor.rawData && tensor.rawData.length > 0) {
      const raw = tensor.rawData
      const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength)
      const isDouble = tensor.dataType === OnnxDataType.DOUBLE
      const size = isDouble ? 8 : 4
      return Array.from({ length: raw.byteLength / size }, (_, k) => (isDouble ? view.getFloat64(k * size, true) : view.getFloat32(k * size, true)))
    }
    return []
  }
  return attributes.get(name)?.floats
}
