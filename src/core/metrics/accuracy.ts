import { checkPaired } from './check-paired.ts'

/**
 * Share of rows whose predicted class matches y, predicting 1 when p > threshold (default 0.5).
 * A probability exactly at the threshold predicts 0, as scikit-learn's LogisticRegression.predict
 * does (decision value > 0). O(n). NaN for no rows or a NaN probability.
 */
export function accuracy(y: ArrayLike<number>, p: ArrayLike<number>, options: { threshold?: number } = {}): number {
  checkPaired('accuracy', y, p, 'binary')
  const threshold = options.threshold ?? 0.5
  if (Number.isNaN(threshold)) throw new RangeError('accuracy needs a threshold that is a number, got NaN')
  let correct = 0
  for (let i = 0; i < y.length; i++) {
    if (Number.isNaN(p[i])) return NaN
    if ((p[i] > threshold ? 1 : 0) === y[i]) correct++
  }
  return correct / y.length
}
