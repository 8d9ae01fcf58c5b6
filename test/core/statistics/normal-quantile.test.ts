import { describe, expect, it } from 'vitest'
import { normalCdf } from '../../../src/core/statistics/normal-cdf.ts'
import { normalQuantile } from '../../../src/core/statistics/normal-quantile.ts'

describe('normalQuantile(p)', () => {
  it('gives the tabulated critical value 1.959964 at 0.975', () => {
    // t critical, df ∞, 0.975: NIST/SEMATECH e-Handbook §1.3.6.7.2;
    // SciPy 1.10.1: norm.ppf(0.975) = 1.959963984540054.
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6)
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 14)
  })
  it('matches scipy.stats.norm.ppf in the tails and near the centre', () => {
    // Computed with SciPy 1.10.1.
    expect(normalQuantile(0.3)).toBeCloseTo(-0.5244005127080409, 15)
    expect(normalQuantile(1e-10)).toBeCloseTo(-6.361340902404056, 13)
    expect(normalQuantile(1e-300)).toBeCloseTo(-37.0470962993612, 12)
    expect(normalQuantile(0.5 + 1e-12) / 2.5065728237018607e-12).toBeCloseTo(1, 12)
  })
  it('inverts normalCdf', () => {
    for (const p of [1e-200, 1e-6, 0.01, 0.2, 0.25, 0.4, 0.6, 0.93, 0.999]) {
      expect(normalCdf(normalQuantile(p)) / p).toBeCloseTo(1, 12)
    }
  })
  it('returns the infinite and central end values', () => {
    expect(normalQuantile(0)).toBe(-Infinity)
    expect(normalQuantile(1)).toBe(Infinity)
    expect(normalQuantile(0.5)).toBe(0)
  })
  it('refuses p outside [0, 1]', () => {
    expect(() => normalQuantile(1.2)).toThrow(new RangeError('normalQuantile needs p in [0, 1], got 1.2'))
    expect(() => normalQuantile(NaN)).toThrow(RangeError)
  })
})
