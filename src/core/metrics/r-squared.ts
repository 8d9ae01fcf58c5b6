import { checkPaired } from './check-paired.ts'

/**
 * Coefficient of determination, R^2 = 1 - SS_res / SS_tot with SS_tot = sum((y - mean(y))^2)
 * (as scikit-learn's r2_score). 1 is perfect, 0 is no better than predicting the mean, and it can
 * be negative. NaN for a constant y (all values equal, so SS_tot = 0), where R^2 is undefined; scikit-learn 1.2.1
 * returns 1.0 or 0.0 there instead (force_finite=True). NaN for no rows or a NaN value. O(n), two passes.
 */
export function rSquared(y: ArrayLike<number>, prediction: ArrayLike<number>): number {
  checkPaired('rSquared', y, prediction, 'any')
  const n = y.length
  let mean = 0
  let isConstant = true
  for (let i = 0; i < n; i++) {
    mean += y[i]
    if (y[i] !== y[0]) isConstant = false
  }
  if (isConstant) return NaN
  mean /= n
  let residual = 0
  let total = 0
  for (let i = 0; i < n; i++) {
    const r = y[i] - prediction[i]
    const t = y[i] - mean
    residual += r * r
    total += t * t
  }
  return 1 - residual / total
}
