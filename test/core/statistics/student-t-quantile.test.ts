import { describe, expect, it } from 'vitest'
import { studentTCdf } from '../../../src/core/statistics/student-t-cdf.ts'
import { studentTQuantile } from '../../../src/core/statistics/student-t-quantile.ts'

describe('studentTQuantile(p, df)', () => {
  it('reproduces the NIST table of critical values', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.2, table of critical values of the t distribution.
    expect(studentTQuantile(0.975, 10)).toBeCloseTo(2.228139, 6)
    expect(studentTQuantile(0.995, 10)).toBeCloseTo(3.169273, 6)
    expect(studentTQuantile(0.975, 4)).toBeCloseTo(2.776445, 6)
    expect(studentTQuantile(0.975, Infinity)).toBeCloseTo(1.959964, 6)
  })
  it('agrees with a 40-digit inversion of the t CDF', () => {
    // Computed with mpmath 1.2.1 (findroot on betainc at 40 digits). SciPy 1.10.1's t.ppf agrees
    // to about 1e-11 on the first three and is 1.2e-9 off on the fourth (0.3560313656774198).
    expect(studentTQuantile(0.975, 10)).toBeCloseTo(2.2281388519862742, 14)
    expect(studentTQuantile(0.975, 4)).toBeCloseTo(2.7764451051977935, 14)
    expect(studentTQuantile(0.975, 5.882352941176471)).toBeCloseTo(2.458823709699146, 14)
    expect(studentTQuantile(0.6, 0.7)).toBeCloseTo(0.3560313652346803, 14)
    expect(studentTQuantile(0.999, 1.3)).toBeCloseTo(89.92242898188, 10)
    expect(studentTQuantile(0.01, 136.875)).toBeCloseTo(-2.3539001893728344, 13)
    expect(studentTQuantile(1e-12, 3.5) / -3163.030683798015).toBeCloseTo(1, 13)
  })
  it('keeps relative precision far in the tail and next to the centre', () => {
    // Computed with mpmath 1.2.1: the root of ln P(T30 > t) = ln 1e-300 is 50178575360.505080714…
    // (SciPy 1.10.1's t.ppf(1e-300, 30) returns -2.1e11, whose tail is 2.3e-319).
    expect(studentTQuantile(1e-300, 30) / -50178575360.50508).toBeCloseTo(1, 12)
    // Computed with mpmath 1.2.1: p = 0.5 + 1e-9 as a double is 0.5 + 9.99999971718e-10, and
    // the t12 quantile there is 2.5593361858429009e-9 (SciPy 1.10.1: 2.5593362234155637e-9).
    expect(studentTQuantile(0.5 + 1e-9, 12) / 2.559336185842901e-9).toBeCloseTo(1, 12)
  })
  it('uses the closed forms at df 1 and 2', () => {
    // Derived: Cauchy quantile tan(π (p − 1/2)); df 2: (2p − 1) / sqrt(2p(1 − p)).
    expect(studentTQuantile(0.9, 1)).toBeCloseTo(Math.tan(0.4 * Math.PI), 14)
    expect(studentTQuantile(1e-10, 1) / (-1 / Math.tan(1e-10 * Math.PI))).toBeCloseTo(1, 14)
    // Computed with SciPy 1.10.1: t.ppf(0.975, 2) = 4.302652729911275; derived 0.95 / sqrt(0.04875).
    expect(studentTQuantile(0.975, 2)).toBeCloseTo(0.95 / Math.sqrt(0.04875), 14)
    expect(studentTQuantile(0.975, 2)).toBeCloseTo(4.302652729911275, 9)
  })
  it('inverts studentTCdf across df and p', () => {
    for (const df of [0.4, 1.5, 3, 5.882352941176471, 25, 400]) {
      for (const p of [1e-40, 1e-5, 0.02, 0.3, 0.49, 0.75, 0.999]) {
        const t = studentTQuantile(p, df)
        const q = Math.min(p, 1 - p)
        const tail = t < 0 ? studentTCdf(t, df) : 1 - studentTCdf(t, df)
        expect(tail / q).toBeCloseTo(1, 10)
      }
    }
  })
  it('returns the end values and infinity beyond the largest double', () => {
    expect(studentTQuantile(0, 5)).toBe(-Infinity)
    expect(studentTQuantile(1, 5)).toBe(Infinity)
    expect(studentTQuantile(0.5, 5)).toBe(0)
    // Derived: with df = 0.3 the 1e-200 quantile is about 1e666, past the largest double.
    expect(studentTQuantile(1e-200, 0.3)).toBe(-Infinity)
  })
  it('refuses p outside [0, 1] and df <= 0', () => {
    expect(() => studentTQuantile(-0.1, 3)).toThrow(new RangeError('studentTQuantile needs p in [0, 1], got -0.1'))
    expect(() => studentTQuantile(0.5, -2)).toThrow(
      new RangeError('studentTQuantile needs degrees of freedom > 0, got -2'),
    )
  })
})
