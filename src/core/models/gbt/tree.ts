/**
 * The fitted form of one regression tree, as flat arrays (node i's fields at index i; node 0 is the
 * root). A row goes left when `value <= threshold[i]`; a missing value (NaN) goes left when
 * `missingGoesLeft[i]` is 1. Leaves have feature -1 and carry `value`, with the learning rate
 * already folded in. Thresholds are raw feature values, so a tree can be evaluated (or exported
 * to ONNX TreeEnsemble with BRANCH_LEQ) without the bins it was grown on.
 */
export interface Tree {
  readonly feature: Int32Array
  readonly threshold: Float64Array
  readonly left: Int32Array
  readonly right: Int32Array
  readonly missingGoesLeft: Uint8Array
  readonly value: Float64Array
}

/**
 * A boosted ensemble: raw score = baseScore + sum of tree outputs; binary applies the logistic.
 * Multiclass: K raw scores per row, class k's from trees k, K + k, 2K + k, ... (round-major, one
 * tree per class per round, as XGBoost orders them), each plus baseScore; softmax over the K.
 */
export interface BoostedEnsemble {
  readonly task: 'binary' | 'regression' | 'multiclass'
  readonly featureNames: readonly string[]
  /** Regression: the mean target. Binary: log-odds of the training positive rate. Multiclass: 0 (a constant margin cancels in the softmax). */
  readonly baseScore: number
  readonly trees: readonly Tree[]
  /** Multiclass only: K >= 3. */
  readonly classCount?: number
}
