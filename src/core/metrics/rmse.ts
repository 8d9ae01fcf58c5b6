import { checkPaired } from './check-paired.ts'

/**
 * Root mean squared error, sqrt(mean((y - prediction)^2)), in the target's unit (scikit-learn's
 * mean_squared_error with squared=False). O(n). NaN for no rows or a NaN value.
 */
export function rmse(y: ArrayLike<number>, prediction: ArrayLike<number>): number {
  checkPaired('rmse', y, prediction, 'any')
  let sum = 0
  for (let i = 0; i < y.length; i++) {
    const d = y[i] - prediction[i]
    sum += d * d
  }
  return Math.sqrt(sum / y.length)
}
