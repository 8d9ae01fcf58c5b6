import { checkPaired } from './check-paired.ts'

const EPSILON = 1e-15

/**
 * Mean log loss (binary cross-entropy) of positive-class probabilities:
 * -mean(y log p + (1 - y) log(1 - p)), in nats.
 *
 * p is clipped to [1e-15, 1 - 1e-15] first, so a confident wrong answer costs about 34.54 instead
 * of infinity. This is what scikit-learn's log_loss does with eps=1e-15, its default before
 * version 1.2 (1.2.1 defaults to eps="auto", the machine epsilon 2.2e-16, a slightly larger cap).
 * As there, 1 - p is taken after clipping, so for y = 0 and p = 1 the cost is -log(1 - (1 - 1e-15))
 * = 34.5396 (1 - 1e-15 rounds in binary), not -log(1e-15) = 34.5388.
 * O(n). NaN for no rows or a NaN probability; RangeError for a probability outside [0, 1].
 */
export function logLoss(y: ArrayLike<number>, p: ArrayLike<number>): number {
  checkPaired('logLoss', y, p, 'binary')
  let sum = 0
  for (let i = 0; i < y.length; i++) {
    const probability = p[i]
    if (probability < 0 || probability > 1) throw new RangeError(`logLoss needs probabilities in [0, 1], got ${probability} at index ${i}`)
    const clipped = Math.min(1 - EPSILON, Math.max(EPSILON, probability))
    sum -= Math.log(y[i] === 1 ? clipped : 1 - clipped)
  }
  return sum / y.length
}
