import { describe, expect, it } from 'vitest'
import { monteCarloPValue } from '../../../src/core/statistics/monte-carlo-p-value.ts'

describe('monteCarloPValue(extreme, draws)', () => {
  it('adds one to both counts', () => {
    // Monte Carlo p with the +1 correction, Phipson & Smyth (2010), "Permutation p-values should
    // never be zero" (from memory): 1 exceedance in 10 draws -> 2/11.
    expect(monteCarloPValue(1, 10)).toBeCloseTo(0.181818, 6)
    expect(monteCarloPValue(1, 10)).toBe(2 / 11)
  })
  it('never reaches zero', () => {
    // By hand: no exceedance in 999 draws -> 1/1000.
    expect(monteCarloPValue(0, 999)).toBe(0.001)
    expect(monteCarloPValue(0, 0)).toBe(1)
  })
  it('refuses counts that are not whole or out of range', () => {
    expect(() => monteCarloPValue(11, 10)).toThrow(
      new RangeError('monteCarloPValue needs a whole number of extreme draws from 0 to 10, got 11'),
    )
    expect(() => monteCarloPValue(0, 2.5)).toThrow(
      new RangeError('monteCarloPValue needs a whole number of draws >= 0, got 2.5'),
    )
  })
})
