/**
 * What every p-value adjustment must satisfy (BH and Holm alike): no adjusted value below its raw
 * p-value or above 1, and adjusted values in the same order as the raw ones.
 */
export function isMonotoneAdjustment(p: readonly number[], adjusted: ArrayLike<number>): boolean {
  const order = p.map((_, i) => i).sort((i, j) => p[i] - p[j])
  return order.every(
    (i, rank) => adjusted[i] >= p[i] && adjusted[i] <= 1 && (rank === 0 || adjusted[order[rank - 1]] <= adjusted[i]),
  )
}
