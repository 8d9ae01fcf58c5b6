import { checkPaired } from './check-paired.ts'

/**
 * Mean absolute error, mean(|y - prediction|), in the target's unit (scikit-learn's
 * mean_absolute_error). O(n). NaN for no rows or a NaN value.
 */
export function mae(y: ArrayLike<number>, prediction: ArrayLike<number>): number {
  checkPaired('mae', y, prediction, 'any')
  let sum = 0
  for (let i = 0; i < y.length; i++) sum += Math.abs(y[i] - prediction[i])
  return sum / y.length
}
