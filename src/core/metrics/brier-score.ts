import { checkPaired } from './check-paired.ts'

/**
 * Brier score: mean squared difference between the positive-class probability and the 0/1 outcome
 * (Brier 1950, Monthly Weather Review 78(1); scikit-learn's brier_score_loss). 0 is perfect, lower is
 * better. O(n). NaN for no rows or a NaN probability; RangeError for a probability outside [0, 1].
 */
export function brierScore(y: ArrayLike<number>, p: ArrayLike<number>): number {
  checkPaired('brierScore', y, p, 'binary')
  let sum = 0
  for (let i = 0; i < y.length; i++) {
    if (p[i] < 0 || p[i] > 1) throw new RangeError(`brierScore needs probabilities in [0, 1], got ${p[i]} at index ${i}`)
    const d = p[i] - y[i]
    sum += d * d
  }
  return sum / y.length
}
