import { describe, expect, it } from 'vitest'
import { tInterval } from '../../../src/core/statistics/t-interval.ts'

describe('tInterval(values, {level})', () => {
  it('reproduces the one-sample 95% interval of the check values', () => {
    // One-sample 95% t interval, computed: half-width 0.0196324316, s = 0.0158113883,
    // t = 2.7764451052. SciPy 1.10.1: t.ppf(0.975, 4) * s / sqrt(5) = 0.019632431614775604.
    const result = tInterval([0.1, 0.12, 0.08, 0.11, 0.09])
    expect(result.mean).toBeCloseTo(0.1, 15)
    expect(result.sd).toBeCloseTo(0.0158113883, 10)
    expect(result.n).toBe(5)
    expect(result.halfWidth).toBeCloseTo(0.019632431614775604, 14)
    expect(result.lower).toBeCloseTo(0.1 - 0.019632431614775604, 14)
    expect(result.upper).toBeCloseTo(0.1 + 0.019632431614775604, 14)
  })
  it('takes another level', () => {
    // Computed with mpmath 1.2.1 at 40 digits: t_{4, 0.995} = 4.6040948713499932, times s / sqrt(5)
    // gives 0.0325558670475778533 (SciPy 1.10.1's t.ppf(0.995, 4) = 4.604094871415897 is 1.4e-11 high).
    expect(tInterval([0.1, 0.12, 0.08, 0.11, 0.09], { level: 0.99 }).halfWidth).toBeCloseTo(0.03255586704757785, 14)
  })
  it('returns NaN spread and bounds for a single value', () => {
    expect(tInterval([4.2])).toEqual({ mean: 4.2, sd: NaN, n: 1, halfWidth: NaN, lower: NaN, upper: NaN })
  })
  it('gives a zero-width interval for a constant sample', () => {
    expect(tInterval([3, 3, 3]).halfWidth).toBe(0)
  })
  it('refuses an empty sample, NaN and a level outside (0, 1)', () => {
    expect(() => tInterval([])).toThrow(new RangeError('tInterval needs at least one value, got none'))
    expect(() => tInterval([1, NaN])).toThrow(
      new RangeError('tInterval cannot use NaN (at index 1); drop missing values first'),
    )
    expect(() => tInterval([1, 2], { level: 95 })).toThrow(new RangeError('tInterval needs a level in (0, 1), got 95'))
  })
})
