import { sampleStandardDeviation as libraryStandardDeviation } from 'simple-statistics'

/**
 * Sample standard deviation, sqrt(Σ(x − mean)² / (n − 1)) (Bessel's correction), from
 * simple-statistics. NaN, not an error, for fewer than two values: one refit has no spread to speak
 * of, and the report prints NaN as "n/a".
 */
export function sampleStandardDeviation(values: readonly number[]): number {
  return values.length < 2 ? NaN : libraryStandardDeviation([...values])
}
