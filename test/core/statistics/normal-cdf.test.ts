import { describe, expect, it } from 'vitest'
import { normalCdf } from '../../../src/core/statistics/normal-cdf.ts'

describe('normalCdf(z)', () => {
  it('matches scipy.stats.norm.cdf in the body', () => {
    // Computed with SciPy 1.10.1.
    expect(normalCdf(0)).toBe(0.5)
    expect(normalCdf(0.3)).toBeCloseTo(0.6179114221889526, 15)
    expect(normalCdf(2.5)).toBeCloseTo(0.9937903346742238, 15)
    // NIST/SEMATECH e-Handbook §1.3.6.7.2 (t table, df ∞): the 0.975 point is 1.959964;
    // SciPy 1.10.1 norm.ppf(0.975) = 1.959963984540054.
    expect(normalCdf(-1.959963984540054)).toBeCloseTo(0.025, 15)
  })
  it('keeps relative precision far out in the lower tail', () => {
    // Computed with SciPy 1.10.1: norm.cdf(-8), norm.cdf(-37.5).
    expect(normalCdf(-8) / 6.22096057427174e-16).toBeCloseTo(1, 13)
    expect(normalCdf(-37.5) / 4.605353009581954e-308).toBeCloseTo(1, 12)
  })
  it('handles infinities and NaN', () => {
    expect(normalCdf(-Infinity)).toBe(0)
    expect(normalCdf(Infinity)).toBe(1)
    expect(normalCdf(NaN)).toBeNaN()
  })
})
