/**
 * Mid-ranks (average ranks, "fractional ranking"): 1-based ranks in input order, where each group
 * of tied values shares the mean of the ranks it spans ([10, 20, 20, 30] -> [1, 2.5, 2.5, 4]).
 *
 * Same as scipy.stats.rankdata(method='average'). The rank statistics here (Spearman's rho,
 * Wilcoxon's signed-rank test) need these; minimum ranks (d3.rank) would bias them under ties.
 * simple-statistics computes mid-ranks inside sampleRankCorrelation but does not export them
 * (and its are 0-based).
 *
 * Edges: an empty input gives an empty array; ±Infinity rank as the extremes (two equal
 * infinities tie); NaN has no rank and is a RangeError naming its index. Cost: O(n log n).
 */
export function midranks(values: ArrayLike<number>): Float64Array {
  const n = values.length
  const order = new Uint32Array(n)
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(values[i])) throw new RangeError(`midranks cannot rank NaN (at index ${i})`)
    order[i] = i
  }
  order.sort((i, j) => (values[i] < values[j] ? -1 : values[i] > values[j] ? 1 : 0))
  const ranks = new Float64Array(n)
  for (let start = 0; start < n; ) {
    let end = start
    while (end + 1 < n && values[order[end + 1]] === values[order[start]]) end++
    const rank = (start + end) / 2 + 1
    for (let k = start; k <= end; k++) ranks[order[k]] = rank
    start = end + 1
  }
  return ranks
}
