import { describe, expect, it } from 'vitest'
import { normalCdf } from '../../../src/core/statistics/normal-cdf.ts'
import { studentTCdf } from '../../../src/core/statistics/student-t-cdf.ts'

describe('studentTCdf(t, df)', () => {
  it('matches the closed-form tails for df 1 and 2', () => {
    // Closed-form tails (derived): P(T1 > 1) = 1/2 − arctan(1)/π = 0.25,
    // P(T2 > 2) = (1 − 2/√6)/2 = 0.0917517095361369.
    expect(studentTCdf(-1, 1)).toBeCloseTo(0.25, 15)
    expect(1 - studentTCdf(1, 1)).toBeCloseTo(0.25, 15)
    expect(studentTCdf(-2, 2)).toBeCloseTo(0.0917517095361369, 15)
  })
  it('takes a fractional df, as Welch’s test needs', () => {
    // Computed with SciPy 1.10.1: t.cdf(-1.8973665961010275, 5.882352941176471) — the Welch row
    // example (x = 1..5 vs 2, 4, 6, 8, 10), whose two-sided p is 0.10753119493062728 (SciPy 1.17.1).
    expect(studentTCdf(-1.8973665961010275, 5.882352941176471)).toBeCloseTo(0.05376559746531359, 14)
    expect(2 * studentTCdf(-1.8973665961010275, 5.882352941176471)).toBeCloseTo(0.10753119493062728, 14)
    // Computed with SciPy 1.10.1: t.cdf(0.7, 2.5), t.cdf(-3.2, 0.5), t.cdf(1e-9, 7.3).
    expect(studentTCdf(0.7, 2.5)).toBeCloseTo(0.7282975284052259, 14)
    expect(studentTCdf(-3.2, 0.5)).toBeCloseTo(0.17799446285709264, 14)
    expect(studentTCdf(1e-9, 7.3)).toBeCloseTo(0.5000000003855516, 15)
  })
  it('keeps relative precision in the lower tail', () => {
    // Computed with SciPy 1.10.1: t.cdf(-40, 3.7).
    expect(studentTCdf(-40, 3.7) / 2.5693124910707444e-6).toBeCloseTo(1, 13)
    // Computed with mpmath 1.2.1 at 40 digits: betainc(0.15, 0.5, 0, 0.3 / (0.3 + 1e400)) / 2,
    // a heavy tail whose t² overflows a double.
    expect(studentTCdf(-1e200, 0.3) / 3.495007233838577e-61).toBeCloseTo(1, 12)
  })
  it('stays within the documented accuracy at very large df', () => {
    // Computed with SciPy 1.10.1 and mpmath 1.2.1 (they agree): t.cdf(-2, 1e6) = 0.0227502669256596.
    // The doc comment states a relative error near 1e-16 · df here, so 10 digits.
    expect(studentTCdf(-2, 1e6)).toBeCloseTo(0.0227502669256596, 10)
  })
  it('is the standard normal at df = Infinity', () => {
    expect(studentTCdf(-1.3, Infinity)).toBe(normalCdf(-1.3))
  })
  it('handles infinite and NaN t', () => {
    expect(studentTCdf(-Infinity, 3)).toBe(0)
    expect(studentTCdf(Infinity, 3)).toBe(1)
    expect(studentTCdf(NaN, 3)).toBeNaN()
  })
  it('refuses df <= 0', () => {
    expect(() => studentTCdf(1, 0)).toThrow(new RangeError('studentTCdf needs degrees of freedom > 0, got 0'))
    expect(() => studentTCdf(1, NaN)).toThrow(RangeError)
  })
})
