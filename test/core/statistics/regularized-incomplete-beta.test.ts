import { describe, expect, it } from 'vitest'
import { regularizedIncompleteBeta } from '../../../src/core/statistics/regularized-incomplete-beta.ts'

describe('regularizedIncompleteBeta(x, a, b)', () => {
  it('matches the closed forms for b = 1, a = 1 and a = b', () => {
    // Derived: I_x(a, 1) = x^a; I_x(1, b) = 1 − (1 − x)^b; I_{1/2}(a, a) = 1/2 by symmetry.
    expect(regularizedIncompleteBeta(0.3, 2.7, 1)).toBeCloseTo(0.3 ** 2.7, 15)
    expect(regularizedIncompleteBeta(0.3, 1, 4.5)).toBeCloseTo(1 - 0.7 ** 4.5, 15)
    expect(regularizedIncompleteBeta(0.5, 7.25, 7.25)).toBeCloseTo(0.5, 14)
  })
  it('matches scipy.special.betainc on both sides of the switch point', () => {
    // Computed with SciPy 1.10.1: betainc(a, b, x) (note SciPy's argument order).
    expect(regularizedIncompleteBeta(0.3, 2.5, 0.5)).toBeCloseTo(0.01892712407194565, 15)
    expect(regularizedIncompleteBeta(0.02, 0.5, 3.5)).toBeCloseTo(0.2833426462395922, 14)
    expect(regularizedIncompleteBeta(0.4, 10, 20)).toBeCloseTo(0.785318389762826, 14)
    expect(regularizedIncompleteBeta(0.999, 0.3, 0.7)).toBeCloseTo(0.9970769586444225, 14)
    // mpmath 1.2.1 at 40 digits gives 0.67762816477217895 (SciPy 1.10.1: 0.6776281647721865).
    expect(regularizedIncompleteBeta(0.41, 200, 300)).toBeCloseTo(0.677628164772179, 12)
  })
  it('keeps a small directly computed value to full relative precision', () => {
    // Derived: I_x(a, 1) = x^a, here about 1e-40.
    expect(regularizedIncompleteBeta(1e-8, 5, 1) / 1e-40).toBeCloseTo(1, 13)
  })
  it('returns the end values at 0 and 1', () => {
    expect(regularizedIncompleteBeta(0, 2, 3)).toBe(0)
    expect(regularizedIncompleteBeta(1, 2, 3)).toBe(1)
  })
  it('refuses arguments outside its domain', () => {
    expect(() => regularizedIncompleteBeta(1.5, 2, 3)).toThrow(
      new RangeError('regularizedIncompleteBeta needs x in [0, 1], got 1.5'),
    )
    expect(() => regularizedIncompleteBeta(0.5, -1, 3)).toThrow(
      new RangeError('regularizedIncompleteBeta needs finite a > 0 and b > 0, got a = -1, b = 3'),
    )
    expect(() => regularizedIncompleteBeta(NaN, 1, 1)).toThrow(RangeError)
  })
})
