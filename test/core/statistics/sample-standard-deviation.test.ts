import { describe, expect, it } from 'vitest'
import { sampleStandardDeviation } from '../../../src/core/statistics/sample-standard-deviation.ts'

describe('sampleStandardDeviation(values)', () => {
  it('matches the worked example with Bessel\'s correction', () => {
    // The eight values 2, 4, 4, 4, 5, 5, 7, 9 have mean 5 and squared deviations summing to 32: the
    // population SD is 2 (the worked example of Wikipedia's "Standard deviation" article), the
    // sample SD sqrt(32 / 7) = 2.138089935299395 (numpy.std(..., ddof=1), NumPy 1.24.2).
    expect(sampleStandardDeviation([2, 4, 4, 4, 5, 5, 7, 9])).toBeCloseTo(2.138089935299395, 14)
    expect(sampleStandardDeviation([0.8, 0.82, 0.78])).toBeCloseTo(0.02, 14)
  })

  it('is NaN, not an error, for fewer than two values, and 0 for a constant sample', () => {
    expect(sampleStandardDeviation([])).toBeNaN()
    expect(sampleStandardDeviation([0.8])).toBeNaN()
    expect(sampleStandardDeviation([0.5, 0.5, 0.5])).toBe(0)
    // A constant that binary floating point cannot hold exactly leaves a rounding residue: the
    // compensated sum gives the mean 0.7000000000000001, so the SD is about 1e-16, not 0.
    expect(sampleStandardDeviation([0.7, 0.7, 0.7])).toBeLessThan(1e-15)
  })
})
