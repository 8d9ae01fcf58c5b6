import { mean, sampleStandardDeviation } from 'simple-statistics'
import { studentTQuantile } from './student-t-quantile.ts'

/**
 * Two-sided Student t confidence interval for a mean: mean ± t_{n−1, (1+level)/2} · sd / sqrt(n),
 * with sd the sample standard deviation (ddof 1) from simple-statistics and the quantile from
 * studentTQuantile (NIST/SEMATECH e-Handbook of Statistical Methods, "Confidence limits for the
 * mean", §1.3.5.2, section number from memory). `level` defaults to 0.95.
 *
 * Edges: an empty sample, NaN values, or a level outside (0, 1) are RangeErrors. A single value
 * gives mean = that value and NaN for sd, halfWidth, lower and upper: one value carries no spread
 * estimate, and an infinite half-width would read as a computed answer. A constant sample gives
 * halfWidth 0. Cost: O(n) plus one t quantile.
 */
export function tInterval(
  values: ArrayLike<number>,
  options: { level?: number } = {},
): { mean: number; sd: number; n: number; halfWidth: number; lower: number; upper: number } {
  const level = options.level ?? 0.95
  if (!(level > 0 && level < 1)) throw new RangeError(`tInterval needs a level in (0, 1), got ${level}`)
  const sample = Array.from(values)
  const n = sample.length
  if (n === 0) throw new RangeError('tInterval needs at least one value, got none')
  const missing = sample.findIndex(Number.isNaN)
  if (missing >= 0) throw new RangeError(`tInterval cannot use NaN (at index ${missing}); drop missing values first`)
  const center = mean(sample)
  if (n === 1) return { mean: center, sd: NaN, n, halfWidth: NaN, lower: NaN, upper: NaN }
  const sd = sampleStandardDeviation(sample)
  const halfWidth = (-studentTQuantile((1 - level) / 2, n - 1) * sd) / Math.sqrt(n)
  return { mean: center, sd, n, halfWidth, lower: center - halfWidth, upper: center + halfWidth }
}
