import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { spearmanRho } from '../../../src/core/statistics/spearman-rho.ts'

describe('spearmanRho(x, y)', () => {
  it('matches scipy.stats.spearmanr', () => {
    // Computed with SciPy 1.10.1: scipy.stats.spearmanr([1,2,3,4,5], [5,6,7,8,7]) (mid-ranks).
    expect(spearmanRho([1, 2, 3, 4, 5], [5, 6, 7, 8, 7])).toBeCloseTo(0.8207826816681233, 14)
    // Ties, computed with SciPy 1.10.1: spearmanr([1,2,2,3,4,4,5], [1,3,2,2,4,5,5]).
    expect(spearmanRho([1, 2, 2, 3, 4, 4, 5], [1, 3, 2, 2, 4, 5, 5])).toBeCloseTo(0.8888888888888891, 14)
    // Computed with SciPy 1.10.1: spearmanr([0.3,1.7,1.7,2.2,5,5,5,0.1], [2,2,3,1,4,4,0,1]).
    expect(spearmanRho([0.3, 1.7, 1.7, 2.2, 5, 5, 5, 0.1], [2, 2, 3, 1, 4, 4, 0, 1])).toBeCloseTo(
      0.26877099855455017,
      14,
    )
  })
  it('differs from the sum-of-squared-differences shortcut under ties', () => {
    // By hand: ranks of x = [1, 2.5, 2.5, 4], y = [1, 2, 3, 4]; Σd² = 0.5, so the shortcut gives
    // 1 − 6·0.5/60 = 0.95, while Pearson on the mid-ranks gives 4.5 / sqrt(4.5·5) = 0.9486833.
    expect(spearmanRho([1, 2, 2, 3], [1, 2, 3, 4])).toBeCloseTo(4.5 / Math.sqrt(4.5 * 5), 14)
  })
  it('is 1 for a monotone increasing relation and -1 for a decreasing one', () => {
    expect(spearmanRho([1, 2, 3, 4], [1, 8, 27, 64])).toBe(1)
    expect(spearmanRho([1, 2, 3, 4], [-1, -8, -27, -64])).toBe(-1)
  })
  it('returns NaN when the correlation is undefined', () => {
    expect(spearmanRho([1], [1])).toBeNaN()
    expect(spearmanRho([2, 2, 2], [1, 2, 3])).toBeNaN()
    expect(spearmanRho([1, 2, 3], [1, NaN, 3])).toBeNaN()
  })
  it('refuses samples of different length', () => {
    expect(() => spearmanRho([1], [1, 2])).toThrow(new RangeError('spearmanRho needs paired samples, got 1 and 2 values'))
  })
  const pairs = fc.array(fc.tuple(fc.integer({ min: -4, max: 4 }), fc.integer({ min: -4, max: 4 })), {
    minLength: 2,
    maxLength: 25,
  })
  const same = (a: number, b: number): boolean => (Number.isNaN(a) ? Number.isNaN(b) : Math.abs(a - b) < 1e-12)
  it('is symmetric in its arguments', () => {
    fc.assert(
      fc.property(pairs, (list) => {
        const x = list.map((p) => p[0])
        const y = list.map((p) => p[1])
        return same(spearmanRho(x, y), spearmanRho(y, x))
      }),
    )
  })
  it('does not depend on the order the pairs are listed in', () => {
    fc.assert(
      fc.property(pairs, fc.array(fc.integer(), { minLength: 25, maxLength: 25 }), (list, keys) => {
        const order = list.map((_, i) => i).sort((i, j) => keys[i] - keys[j])
        const rho = spearmanRho(list.map((p) => p[0]), list.map((p) => p[1]))
        return same(rho, spearmanRho(order.map((i) => list[i][0]), order.map((i) => list[i][1])))
      }),
    )
  })
})
