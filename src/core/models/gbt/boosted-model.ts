import type { FeatureMatrix, Task } from '../../data/dataset.ts'
import type { Model, ReplacementPredictor } from '../model.ts'
import { combineClassScores, createClassEnsemblesPredictor } from './class-ensembles-predictor.ts'
import { createTreeReplacementPredictor } from './replacement-predictor.ts'
import type { BoostedEnsemble, Tree } from './tree.ts'

/** Gain and split count of one feature over a whole ensemble (in-sample impurity importance). */
export interface SplitStatistic {
  readonly feature: string
  /** Sum over the ensemble's splits on this feature of the loss reduction (Chen & Guestrin 2016, eq. 7). */
  readonly gain: number
  readonly splits: number
}

/**
 * A boosted tree ensemble as a Model. Evaluates raw feature values with the trees' thresholds, so it
 * needs no bins: a row goes left when value <= threshold, a NaN follows the node's missing direction.
 */
export class BoostedModel implements Model {
  readonly kind = 'boosted-trees'
  readonly engine = 'plumbline-trees'
  readonly task: Task
  readonly featureNames: readonly string[]
  /** Multiclass only: K; predict returns row-major [N, K] softmax probabilities. */
  readonly classCount?: number

  constructor(
    readonly ensemble: BoostedEnsemble,
    readonly splitStatistics?: readonly SplitStatistic[],
  ) {
    this.task = ensemble.task
    this.featureNames = ensemble.featureNames
    if (ensemble.classCount !== undefined) this.classCount = ensemble.classCount
  }

  /**
   * Predictions over raw values ("raw" as opposed to bins): the regression value, or for a binary
   * task the positive-class probability. Features are found by name in `matrix`, in any order; extra
   * columns are ignored. Throws RangeError naming a feature the matrix lacks. Cost O(rows x trees x depth).
   */
  /** Permutation importance's fast path: see createTreeReplacementPredictor. */
  createReplacementPredictor(base: FeatureMatrix): ReplacementPredictor | undefined {
    if (this.task === 'multiclass') {
      // One ensemble per class (trees k, K + k, ...), each with the one-score fast path, then the softmax.
      const k = this.ensemble.classCount!
      const classes = Array.from({ length: k }, (_, c) => ({
        featureNames: this.featureNames,
        baseScore: this.ensemble.baseScore,
        trees: this.ensemble.trees.filter((_, t) => t % k === c),
        link: 'identity' as const,
      }))
      return createClassEnsemblesPredictor({ classes, link: 'softmax' }, base)
    }
    return createTreeReplacementPredictor({ ...this.ensemble, link: this.task === 'binary' ? 'logistic' : 'identity' }, base)
  }

  predictRaw(matrix: FeatureMatrix): Float64Array {
    const position = new Map(matrix.features.map((f, j) => [f.name, j]))
    const columns = this.featureNames.map((name) => {
      const j = position.get(name)
      if (j === undefined) {
        throw new RangeError(`BoostedModel.predictRaw: the matrix has no feature named '${name}'`)
      }
      return matrix.columns[j]
    })
    const n = matrix.rows
    if (this.task === 'multiclass') return this.predictClasses(columns, n)
    const score = new Float64Array(n).fill(this.ensemble.baseScore)
    for (const tree of this.ensemble.trees) addTree(tree, columns, n, score)
    if (this.task === 'binary') {
      for (let i = 0; i < n; i++) score[i] = 1 / (1 + Math.exp(-score[i]))
    }
    return score
  }

  async predict(matrix: FeatureMatrix): Promise<Float64Array> {
    return this.predictRaw(matrix)
  }

  /** Multiclass: each class's raw score from its trees (round-major order), then the softmax of each row; row-major [N, K]. */
  private predictClasses(columns: readonly Float64Array[], n: number): Float64Array {
    const k = this.ensemble.classCount!
    const margins = Array.from({ length: k }, () => new Float64Array(n).fill(this.ensemble.baseScore))
    this.ensemble.trees.forEach((tree, t) => addTree(tree, columns, n, margins[t % k]))
    return combineClassScores(margins, 'softmax')
  }
}

function addTree(tree: Tree, columns: readonly Float64Array[], n: number, score: Float64Array): void {
  const { feature, threshold, left, right, missingGoesLeft, value } = tree
  for (let i = 0; i < n; i++) {
    let node = 0
    let f = feature[0]
    while (f >= 0) {
      const v = columns[f][i]
      const goLeft = v !== v ? missingGoesLeft[node] === 1 : v <= threshold[node]
      node = goLeft ? left[node] : right[node]
      f = feature[node]
    }
    score[i] += value[node]
  }
}
