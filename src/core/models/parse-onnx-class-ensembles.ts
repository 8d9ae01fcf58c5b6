/**
 * Reads a multiclass ONNX tree ensemble (ai.onnx.ml TreeEnsembleClassifier with K >= 3 classes over
 * one [N, F] float input, its probability output read directly, through Identity or Cast-to-float
 * nodes only) into one EvaluableEnsemble per class, so a loaded multiclass gradient-boosting or
 * forest model gets plumbline's tree evaluator and permutation fast path. Pure: bytes in, trees out.
 *
 * Class k's ensemble holds the leaf weights of class id k (trees without any are left out) and base
 * value k. The operator's probabilities are, per row, p = post_transform(score) with score_k = base_k +
 * Σ weights of class k: post_transform NONE (forests: each leaf's class fractions over the number of
 * trees) gives the scores themselves, SOFTMAX the softmax over the K scores (gradient boosting),
 * as onnxruntime 1.30 computes them for three or more classes (checked against it in
 * test/python/multiclass-onnx.test.ts). Other post transforms, several outputs of weights that do not
 * cover every class, and everything parseOnnxTreeEnsemble refuses return a reason instead.
 * Kept apart from parseOnnxTreeEnsemble (one score per row) on purpose: its node and attribute
 * readers are shared, the graph forms are not.
 * Cost: O(nodes · K) after protobuf decoding.
 */
import type { EvaluableEnsemble } from './gbt/replacement-predictor.ts'
import { OnnxDataType } from './onnx-proto.ts'
import { buildTrees, leafWeights, numbersOf, readTreeGraph, stringOf, type Attribute } from './parse-onnx-tree-ensemble.ts'

export type ParsedClassEnsembles =
  | {
      readonly ok: true
      /** One per class, in the operator's class order (column k of its probability output). */
      readonly classes: readonly Omit<EvaluableEnsemble, 'featureNames'>[]
      readonly postTransform: 'NONE' | 'SOFTMAX'
      /** Input columns the trees read (the largest feature id + 1). */
      readonly width: number
    }
  | { readonly ok: false; readonly reason: string }

const no = (reason: string): ParsedClassEnsembles => ({ ok: false, reason })

export function parseOnnxClassEnsembles(bytes: Uint8Array, target: { readonly outputName: string; readonly classCount: number }): ParsedClassEnsembles {
  const graph = readTreeGraph(bytes)
  if (!graph.ok) return graph
  const { input, elemType, source } = graph
  const end = source(target.outputName)
  const operator = end.node
  if (operator?.opType !== 'TreeEnsembleClassifier' || operator.domain !== 'ai.onnx.ml' || operator.output?.[1] !== end.name) {
    return no(`the output '${target.outputName}' does not come from a TreeEnsembleClassifier's probabilities`)
  }
  const reaches = source(operator.input?.[0] ?? '')
  if (reaches.node !== undefined || reaches.name !== input.name) return no('TreeEnsembleClassifier does not read the graph input directly')
  const attributes = new Map<string, Attribute>((operator.attribute ?? []).map((a) => [a.name ?? '', a]))
  const labels = attributes.get('classlabels_strings')?.strings?.length ?? attributes.get('classlabels_int64s')?.ints?.length ?? 0
  if (labels !== target.classCount || labels < 3) return no(`TreeEnsembleClassifier with ${labels} classes, not ${target.classCount}`)
  const post = stringOf(attributes, 'post_transform') ?? 'NONE'
  if (post !== 'NONE' && post !== 'SOFTMAX') return no(`TreeEnsembleClassifier post_transform ${post}`)
  const ids = new Set(attributes.get('class_ids')?.ints ?? [])
  if (ids.size !== labels || [...ids].some((id) => !(id >= 0 && id < labels))) return no('TreeEnsembleClassifier with leaf weights that do not cover every class')
  const base = numbersOf(attributes, 'base_values') ?? []
  const float32Inputs = elemType === OnnxDataType.FLOAT
  const classes: Omit<EvaluableEnsemble, 'featureNames'>[] = []
  let width = 0
  for (let k = 0; k < labels; k++) {
    const leaves = leafWeights(attributes, 'class', (id) => id === k)
    if (!leaves.ok) return no(leaves.reason)
    const built = buildTrees(attributes, leaves.weights, base[k] ?? 0, 'SUM', 'identity', float32Inputs)
    if (!built.ok) return no(built.reason)
    width = Math.max(width, built.width)
    // A tree with no weight of this class adds 0 to its score everywhere.
    classes.push({ baseScore: built.baseScore, trees: built.trees.filter((tree) => tree.value.some((v) => v !== 0)), link: 'identity', float32Inputs })
  }
  return { ok: true, classes, postTransform: post, width }
}
