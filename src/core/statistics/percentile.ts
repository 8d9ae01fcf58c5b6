import { quantileSorted } from 'simple-statistics'

/**
 * The p-th percentile (p from 0 to 100) of a sample by linear interpolation between order
 * statistics: with the values sorted, x_(0) <= ... <= x_(n−1), and h = (n − 1) p / 100, the result
 * is x_(⌊h⌋) + (h − ⌊h⌋)(x_(⌊h⌋+1) − x_(⌊h⌋)). This is definition 7 of Hyndman & Fan (1996,
 * "Sample quantiles in statistical packages", The American Statistician 50(4)), the default of
 * numpy.percentile and R's quantile. The interpolation is simple-statistics' quantileSorted
 * (which implements type 7); this function sorts a copy and takes p in percent.
 *
 * Edges: an empty sample or p outside [0, 100] (or NaN) is a RangeError; NaN in the values gives
 * NaN (as numpy.percentile). Cost: O(n log n) for the sort.
 */
export function percentile(values: ArrayLike<number>, p: number): number {
  if (!(p >= 0 && p <= 100)) throw new RangeError(`percentile needs p from 0 to 100, got ${p}`)
  if (values.length === 0) throw new RangeError('percentile needs at least one value, got none')
  const sorted = Float64Array.from(values).sort()
  if (Number.isNaN(sorted[sorted.length - 1])) return NaN
  return quantileSorted(Array.from(sorted), p / 100)
}
