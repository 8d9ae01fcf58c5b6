import { checkClassMatrix } from './check-paired.ts'

/**
 * Share of rows whose most probable class (argmax of the row of an [N, K] probability matrix)
 * is y. Ties go to the lowest class index, as numpy.argmax and scikit-learn's predict do.
 * `probabilities` is row-major (row i's class k at i·K + k). O(N·K). NaN for no rows or a NaN probability.
 */
export function multiclassAccuracy(y: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  const k = checkClassMatrix('multiclassAccuracy', y, probabilities)
  if (k === 0) return NaN
  let correct = 0
  for (let i = 0; i < y.length; i++) {
    const predicted = argmaxRow(probabilities, i * k, k)
    if (predicted < 0) return NaN
    if (predicted === y[i]) correct++
  }
  return correct / y.length
}

/** The index (0..k-1) of the largest of k values from `offset`, the first on ties; -1 when one is NaN. */
export function argmaxRow(values: ArrayLike<number>, offset: number, k: number): number {
  let best = 0
  let bestValue = values[offset]
  if (bestValue !== bestValue) return -1
  for (let c = 1; c < k; c++) {
    const v = values[offset + c]
    if (v !== v) return -1
    if (v > bestValue) {
      best = c
      bestValue = v
    }
  }
  return best
}
