import { checkClassMatrix } from './check-paired.ts'

const EPSILON = 1e-15

/**
 * Mean multi-class log loss (cross-entropy) of an [N, K] probability matrix, in nats:
 * -mean_i log q(i, y_i), where q is each probability clipped to [1e-15, 1 - 1e-15] and each row
 * then divided by its sum. This is scikit-learn 1.2.1's log_loss(y, P, eps=1e-15) for K columns
 * (it clips, then renormalizes the rows), the same clipping as the binary logLoss here.
 * `probabilities` is row-major (row i's class k at i·K + k), y the class indices 0..K-1.
 * O(N·K). NaN for no rows or a NaN probability; RangeError for a probability outside [0, 1].
 */
export function multiclassLogLoss(y: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  const k = checkClassMatrix('multiclassLogLoss', y, probabilities)
  if (k === 0) return NaN
  let sum = 0
  for (let i = 0; i < y.length; i++) sum += rowLogLoss(y[i], probabilities, i * k, k, i)
  return sum / y.length
}

/** One row's loss, -log q(i, y_i) (see multiclassLogLoss); shared with the per-row contributions. */
export function rowLogLoss(label: number, probabilities: ArrayLike<number>, offset: number, k: number, row = 0): number {
  let total = 0
  let own = 0
  for (let c = 0; c < k; c++) {
    const p = probabilities[offset + c]
    if (p < 0 || p > 1) throw new RangeError(`multiclassLogLoss needs probabilities in [0, 1], got ${p} at row ${row}, class ${c}`)
    const clipped = Math.min(1 - EPSILON, Math.max(EPSILON, p))
    total += clipped
    if (c === label) own = clipped
  }
  return -Math.log(own / total)
}
