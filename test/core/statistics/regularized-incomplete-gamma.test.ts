import { describe, expect, it } from 'vitest'
import { regularizedIncompleteGamma } from '../../../src/core/statistics/regularized-incomplete-gamma.ts'

describe('regularizedIncompleteGamma(a, x)', () => {
  it('matches the closed form for a = 1 on both branches', () => {
    // Derived: P(1, x) = 1 − e^{−x}. x = 0.5 uses the series, x = 30 the continued fraction.
    expect(regularizedIncompleteGamma(1, 0.5).lower).toBeCloseTo(1 - Math.exp(-0.5), 15)
    expect(regularizedIncompleteGamma(1, 30).upper / Math.exp(-30)).toBeCloseTo(1, 14)
  })
  it('matches scipy.special.gammainc and gammaincc', () => {
    // Computed with SciPy 1.10.1.
    expect(regularizedIncompleteGamma(0.5, 0.3).lower).toBeCloseTo(0.5614219739190003, 15)
    expect(regularizedIncompleteGamma(0.5, 50).upper / 1.5239706048320995e-23).toBeCloseTo(1, 13)
    expect(regularizedIncompleteGamma(3.5, 2).lower).toBeCloseTo(0.22022259152428406, 15)
    expect(regularizedIncompleteGamma(3.5, 9).upper).toBeCloseTo(0.011970002354029556, 15)
    expect(regularizedIncompleteGamma(40, 25).upper).toBeCloseTo(0.9965564312705729, 14)
  })
  it('returns the end values at 0 and Infinity', () => {
    expect(regularizedIncompleteGamma(2, 0)).toEqual({ lower: 0, upper: 1 })
    expect(regularizedIncompleteGamma(2, Infinity)).toEqual({ lower: 1, upper: 0 })
  })
  it('refuses arguments outside its domain', () => {
    expect(() => regularizedIncompleteGamma(0, 1)).toThrow(
      new RangeError('regularizedIncompleteGamma needs a finite a > 0, got 0'),
    )
    expect(() => regularizedIncompleteGamma(1, -1)).toThrow(
      new RangeError('regularizedIncompleteGamma needs x >= 0, got -1'),
    )
  })
})
