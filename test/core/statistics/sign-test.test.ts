import { describe, expect, it } from 'vitest'
import { signTest } from '../../../src/core/statistics/sign-test.ts'

describe('signTest(differences, {alternative})', () => {
  it('gives the exact binomial p-value of the check values', () => {
    // One-sided sign test, Δ = [0.5, 1.2, −0.3, 0.8, 2.1, 0.9, −0.1, 1.5] -> 0.14453125
    // (computed; SciPy 1.10.1 binomtest(6, 8, alternative='greater') agrees).
    // By hand: 6 of 8 positive, P(X >= 6) = (28 + 8 + 1) / 256.
    const result = signTest([0.5, 1.2, -0.3, 0.8, 2.1, 0.9, -0.1, 1.5], { alternative: 'greater' })
    expect(result.positive).toBe(6)
    expect(result.negative).toBe(2)
    expect(result.pValue).toBeCloseTo(0.14453125, 15)
  })
  it('gives the lower and two-sided p-values of scipy.stats.binomtest', () => {
    // Computed with SciPy 1.10.1: binomtest(6, 8) 'less' 0.96484375, 'two-sided' 0.2890625.
    const deltas = [0.5, 1.2, -0.3, 0.8, 2.1, 0.9, -0.1, 1.5]
    expect(signTest(deltas, { alternative: 'less' }).pValue).toBeCloseTo(0.96484375, 15)
    expect(signTest(deltas, { alternative: 'two-sided' }).pValue).toBeCloseTo(0.2890625, 15)
  })
  it('stays exact for large n and drops zeros', () => {
    // Computed with SciPy 1.10.1: binomtest(520, 1000) -> 0.10872414660207046 / 0.9026168357691174 /
    // 0.2174482932041409, and binomtest(29, 40) 'greater' -> 0.003213288047845708.
    const thousand = [...Array(520).fill(1), ...Array(480).fill(-1), 0, 0]
    expect(signTest(thousand, { alternative: 'greater' }).pValue).toBeCloseTo(0.10872414660207046, 13)
    expect(signTest(thousand, { alternative: 'less' }).pValue).toBeCloseTo(0.9026168357691174, 13)
    expect(signTest(thousand, { alternative: 'two-sided' }).pValue).toBeCloseTo(0.2174482932041409, 13)
    const forty = [...Array(29).fill(0.3), ...Array(11).fill(-2)]
    expect(signTest(forty, { alternative: 'greater' }).pValue).toBeCloseTo(0.003213288047845708, 15)
  })
  it('returns p = 1 when every difference is zero', () => {
    expect(signTest([0, 0], { alternative: 'greater' })).toEqual({ positive: 0, negative: 0, pValue: 1 })
  })
  it('refuses NaN and unknown alternatives', () => {
    expect(() => signTest([NaN], { alternative: 'less' })).toThrow(
      new RangeError('signTest cannot use NaN (difference 0); drop missing pairs first'),
    )
    const options = { alternative: 'both' } as unknown as { alternative: 'less' }
    expect(() => signTest([1], options)).toThrow(
      new RangeError("signTest needs alternative 'greater', 'less' or 'two-sided', got 'both'"),
    )
  })
})
