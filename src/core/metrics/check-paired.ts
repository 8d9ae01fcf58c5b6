/**
 * Shared argument checks of the metrics: y and prediction must be paired, and for binary metrics y
 * must hold only 0 and 1. Throws a RangeError starting with the metric's function name. O(n).
 */
export function checkPaired(name: string, y: ArrayLike<number>, prediction: ArrayLike<number>, labels: 'binary' | 'any'): void {
  if (y.length !== prediction.length) {
    throw new RangeError(`${name} needs paired samples, got ${y.length} targets and ${prediction.length} predictions`)
  }
  if (labels === 'binary') {
    for (let i = 0; i < y.length; i++) {
      if (y[i] !== 0 && y[i] !== 1) throw new RangeError(`${name} needs targets of 0 or 1, got ${y[i]} at index ${i}`)
    }
  }
}

/**
 * Shared argument checks of the multiclass metrics: `probabilities` is row-major [N, K] (row i's
 * class k at i·K + k) with K >= 2, and y holds class indices 0..K-1. Returns K (0 for no rows).
 * Throws a RangeError starting with the metric's function name. O(N·K).
 */
export function checkClassMatrix(name: string, y: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  const n = y.length
  if (n === 0) {
    if (probabilities.length !== 0) throw new RangeError(`${name} needs paired samples, got 0 targets and ${probabilities.length} probabilities`)
    return 0
  }
  const k = probabilities.length / n
  if (!Number.isInteger(k) || k < 2) {
    throw new RangeError(`${name} needs an [N, K] probability matrix with K >= 2 for ${n} targets, got ${probabilities.length} values`)
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isInteger(y[i]) || y[i] < 0 || y[i] >= k) throw new RangeError(`${name} needs class indices from 0 to ${k - 1}, got ${y[i]} at index ${i}`)
  }
  return k
}
