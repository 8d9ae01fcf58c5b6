import { describe, expect, it } from 'vitest'
import { pooledStandardDeviation } from '../../../src/core/statistics/pooled-standard-deviation.ts'

describe('pooledStandardDeviation(sdA, sdB)', () => {
  it('is the root mean square of the two SDs (Cohen 1988, §2.3, equal group sizes)', () => {
    // sqrt((0.02² + 0.01²) / 2) = 0.015811388300841896 (NumPy 1.24.2). With equal n it is the
    // within-group pooled SD sqrt((Σ(a − ā)² + Σ(b − b̄)²) / (nA + nB − 2)): for a = [0.8, 0.82, 0.78]
    // (SD 0.02) and b = [0.7, 0.71, 0.69] (SD 0.01) that is sqrt(0.001 / 4) = 0.015811388300841875
    // (NumPy 1.24.2), the same up to rounding.
    expect(pooledStandardDeviation(0.02, 0.01)).toBeCloseTo(0.015811388300841896, 15)
    expect(pooledStandardDeviation(0.02, 0.01)).toBeCloseTo(0.015811388300841875, 14)
    // 3-4-5: sqrt((9 + 16) / 2) = 3.5355339059327378 = 5 / sqrt(2).
    expect(pooledStandardDeviation(3, 4)).toBeCloseTo(5 / Math.SQRT2, 14)
    expect(pooledStandardDeviation(4, 3)).toBe(pooledStandardDeviation(3, 4))
  })

  it('is NaN when a side has no SD and 0 when neither side varies', () => {
    expect(pooledStandardDeviation(NaN, 0.01)).toBeNaN()
    expect(pooledStandardDeviation(0, 0)).toBe(0)
  })
})
