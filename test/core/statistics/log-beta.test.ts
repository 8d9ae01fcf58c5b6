import { describe, expect, it } from 'vitest'
import { logBeta } from '../../../src/core/statistics/log-beta.ts'

describe('logBeta(a, b)', () => {
  it('matches closed forms for whole numbers', () => {
    // Derived: B(3, 4) = 2! 3! / 6! = 1/60; B(1, b) = 1/b.
    expect(logBeta(3, 4)).toBeCloseTo(-Math.log(60), 14)
    expect(logBeta(1, 12.5)).toBeCloseTo(-Math.log(12.5), 14)
  })
  it('matches scipy.special.betaln for moderate arguments on both sides of the switch at 10', () => {
    // Computed with SciPy 1.10.1: betaln(12.5, 3.25), betaln(0.5, 0.5) = ln(pi).
    expect(logBeta(12.5, 3.25)).toBeCloseTo(-7.545894955682031, 13)
    expect(logBeta(0.5, 0.5)).toBeCloseTo(Math.log(Math.PI), 14)
  })
  it('keeps its digits where the log-gamma terms cancel', () => {
    // Computed with mpmath 1.2.1 at 40 digits: log(beta(5e5, 0.5)) = -5.98881649577746431…
    // (SciPy 1.10.1's betaln gives -5.988816495984793 here, 2e-10 off, from the same cancellation).
    expect(logBeta(5e5, 0.5)).toBeCloseTo(-5.988816495777464, 13)
    // Computed with SciPy 1.10.1 and mpmath 1.2.1 (they agree): betaln(1e6, 1e6).
    expect(logBeta(1e6, 1e6) / -1386300.0033629201).toBeCloseTo(1, 14)
  })
  it('is symmetric', () => {
    expect(logBeta(40, 0.3)).toBe(logBeta(0.3, 40))
  })
  it('refuses non-positive or infinite arguments', () => {
    expect(() => logBeta(0, 1)).toThrow(new RangeError('logBeta needs finite a > 0 and b > 0, got a = 0, b = 1'))
    expect(() => logBeta(1, Infinity)).toThrow(RangeError)
  })
})
