import { pValueOrder } from './p-value-order.ts'

/**
 * Benjamini–Hochberg adjusted p-values (Benjamini & Hochberg 1995, "Controlling the false
 * discovery rate", JRSS-B 57(1)): rejecting every hypothesis whose adjusted value is <= q controls
 * the false discovery rate at q for independent (or positively dependent) tests.
 *
 * With p sorted ascending, p_(1) <= ... <= p_(m), the adjusted value at rank i is
 * min_{j >= i} min(1, m p_(j) / j): a running minimum from the largest p down, capped at 1,
 * returned in input order. Tied p-values get equal adjusted values whatever their order.
 * Same numbers as scipy.stats.false_discovery_control(p, method='bh') (SciPy >= 1.11); simple-statistics has no
 * multiple-testing correction.
 *
 * Edges: an empty input gives an empty array; a value outside [0, 1] or NaN is a RangeError naming
 * its index. Cost: O(m log m).
 */
export function benjaminiHochberg(pValues: ArrayLike<number>): Float64Array {
  const m = pValues.length
  const order = pValueOrder(pValues, 'benjaminiHochberg')
  const adjusted = new Float64Array(m)
  let running = 1
  for (let rank = m; rank >= 1; rank--) {
    const i = order[rank - 1]
    running = Math.min(running, pValues[i] * (m / rank)) // m / rank >= 1, so rounding cannot go below p
    adjusted[i] = running
  }
  return adjusted
}

