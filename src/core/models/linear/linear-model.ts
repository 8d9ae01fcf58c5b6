import type { FeatureMatrix, Task } from '../../data/dataset.ts'
import type { Model } from '../model.ts'

/**
 * One feature's part of a linear model's score, on raw values.
 *
 * - numeric: `coefficient * x`, with NaN replaced by `fill` (the training mean), so a missing value
 *   contributes `coefficient * fill`. This is MatMul + Add after an Imputer in ONNX terms.
 * - categorical: `coefficients[code]`, the contribution of category code `code` (one-hot with the
 *   lowest code seen in training as the reference, whose coefficient is 0). NaN, a code outside the
 *   array, and a code not seen in training contribute `fill`, the training-frequency-weighted mean of
 *   the seen codes' contributions (the one-hot analogue of imputing the mean).
 */
export type LinearTerm =
  | { readonly kind: 'numeric'; readonly coefficient: number; readonly fill: number }
  | { readonly kind: 'categorical'; readonly coefficients: readonly number[]; readonly fill: number }

/**
 * A fitted linear model on raw feature values: score = intercept + sum of terms[j] at feature j.
 * Regression predicts the score; binary predicts the logistic 1 / (1 + exp(-score)).
 * `terms[j]` belongs to `featureNames[j]`. Whatever standardization the fit used is already folded in.
 */
export interface LinearModelState {
  readonly task: Task
  readonly featureNames: readonly string[]
  readonly intercept: number
  readonly terms: readonly LinearTerm[]
}

/** How an iterative fit ended (logistic regression); absent for closed-form fits. */
export interface LinearConvergence {
  readonly iterations: number
  /** False when maxIterations ran out first (for example on separable data with l2 = 0). */
  readonly converged: boolean
}

/** A LinearModelState as a Model. Features are found by name in the matrix, in any order. */
export class LinearModel implements Model {
  readonly kind = 'linear'
  readonly engine = 'plumbline-linear'
  readonly task: Task
  readonly featureNames: readonly string[]

  constructor(
    readonly state: LinearModelState,
    readonly convergence?: LinearConvergence,
  ) {
    if (state.terms.length !== state.featureNames.length) {
      throw new RangeError(
        `LinearModel needs one term per feature, got ${state.terms.length} terms for ${state.featureNames.length} features`,
      )
    }
    this.task = state.task
    this.featureNames = state.featureNames
  }

  /**
   * Predictions over raw values: the regression value, or for a binary task the positive-class
   * probability. Throws RangeError naming a feature the matrix lacks. O(rows x features).
   */
  predictRaw(matrix: FeatureMatrix): Float64Array {
    const position = new Map(matrix.features.map((f, j) => [f.name, j]))
    const n = matrix.rows
    const score = new Float64Array(n).fill(this.state.intercept)
    this.state.terms.forEach((term, k) => {
      const j = position.get(this.featureNames[k])
      if (j === undefined) {
        throw new RangeError(`LinearModel.predictRaw: the matrix has no feature named '${this.featureNames[k]}'`)
      }
      const column = matrix.columns[j]
      if (term.kind === 'numeric') {
        const { coefficient, fill } = term
        for (let i = 0; i < n; i++) score[i] += coefficient * (column[i] !== column[i] ? fill : column[i])
        return
      }
      const { coefficients, fill } = term
      for (let i = 0; i < n; i++) {
        const code = column[i]
        score[i] += Number.isInteger(code) && code >= 0 && code < coefficients.length ? coefficients[code] : fill
      }
    })
    if (this.task === 'binary') {
      for (let i = 0; i < n; i++) score[i] = 1 / (1 + Math.exp(-score[i]))
    }
    return score
  }

  async predict(matrix: FeatureMatrix): Promise<Float64Array> {
    return this.predictRaw(matrix)
  }
}
