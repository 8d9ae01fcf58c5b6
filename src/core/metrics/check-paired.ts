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
