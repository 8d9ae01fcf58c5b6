import { pValueOrder } from './p-value-order.ts'

/**
 * Holm's step-down adjusted p-values (Holm 1979, "A simple sequentially rejective multiple test
 * procedure", Scandinavian Journal of Statistics 6(2)): rejecting every hypothesis whose adjusted
 * value is <= alpha controls the family-wise error rate at alpha under any dependence.
 *
 * With p sorted ascending, the adjusted value at rank i is max_{j <= i} min(1, (m − j + 1) p_(j)):
 * a running maximum from the smallest p up, capped at 1, returned in input order. Tied p-values
 * get equal adjusted values. simple-statistics has no multiple-testing correction.
 *
 * Edges: an empty input gives an empty array; a value outside [0, 1] or NaN is a RangeError naming
 * its index. Cost: O(m log m).
 */
export function holm(pValues: ArrayLike<number>): Float64Array {
  const m = pValues.length
  const order = pValueOrder(pValues, 'holm')
  const adjusted = new Float64Array(m)
  let running = 0
  for (let rank = 1; rank <= m; rank++) {
    const i = order[rank - 1]
    running = Math.max(running, Math.min(1, (m - rank + 1) * pValues[i]))
    adjusted[i] = running
  }
  return adjusted
}
