import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { kendallTauB } from '../../../src/core/statistics/kendall-tau-b.ts'

describe('kendallTauB(x, y)', () => {
  it('matches scipy.stats.kendalltau on tied data', () => {
    // Computed with SciPy 1.10.1: scipy.stats.kendalltau([12,2,1,12,2], [1,4,7,1,0]).
    expect(kendallTauB([12, 2, 1, 12, 2], [1, 4, 7, 1, 0])).toBeCloseTo(-0.4714045207910316, 14)
    // Ties on both sides: SciPy 1.10.1 and 1.17.1 kendalltau both give 0.7894736842105262.
    expect(kendallTauB([1, 2, 2, 3, 4, 4, 5], [1, 3, 2, 2, 4, 5, 5])).toBeCloseTo(0.7894736842105263, 14)
    // Computed with SciPy 1.10.1: kendalltau([0.3,1.7,1.7,2.2,5,5,5,0.1], [2,2,3,1,4,4,0,1]).
    expect(kendallTauB([0.3, 1.7, 1.7, 2.2, 5, 5, 5, 0.1], [2, 2, 3, 1, 4, 4, 0, 1])).toBeCloseTo(
      0.24494897427831783,
      14,
    )
  })
  it('uses the tau-b denominator when both samples have ties', () => {
    // By hand: C = 4, D = 0, one pair tied only in x, one only in y -> 4 / sqrt(5 * 5).
    // SciPy 1.10.1: kendalltau([1,2,2,3], [1,2,3,3]) -> 0.7999999999999999.
    expect(kendallTauB([1, 2, 2, 3], [1, 2, 3, 3])).toBeCloseTo(0.8, 14)
  })
  it('gives 0.7142857142857143 for adjacent swaps', () => {
    // [1..8] vs [2,1,4,3,6,5,8,7]: SciPy 1.10.1 kendalltau gives 0.7142857142857142; by hand C = 24, D = 4 -> 20 / 28.
    expect(kendallTauB([1, 2, 3, 4, 5, 6, 7, 8], [2, 1, 4, 3, 6, 5, 8, 7])).toBeCloseTo(20 / 28, 15)
  })
  it('returns NaN when the correlation is undefined', () => {
    expect(kendallTauB([1], [2])).toBeNaN()
    expect(kendallTauB([3, 3, 3], [1, 2, 3])).toBeNaN()
    expect(kendallTauB([1, NaN, 3], [1, 2, 3])).toBeNaN()
  })
  it('refuses samples of different length', () => {
    expect(() => kendallTauB([1, 2], [1])).toThrow(
      new RangeError('kendallTauB needs paired samples, got 2 and 1 values'),
    )
  })
  const pairs = fc.array(fc.tuple(fc.integer({ min: -4, max: 4 }), fc.integer({ min: -4, max: 4 })), {
    minLength: 2,
    maxLength: 25,
  })
  it('is symmetric in its arguments', () => {
    fc.assert(
      fc.property(pairs, (list) => {
        const x = list.map((p) => p[0])
        const y = list.map((p) => p[1])
        const forward = kendallTauB(x, y)
        const backward = kendallTauB(y, x)
        return Number.isNaN(forward) ? Number.isNaN(backward) : Math.abs(forward - backward) < 1e-12
      }),
    )
  })
  it('does not depend on the order the pairs are listed in', () => {
    fc.assert(
      fc.property(pairs, fc.array(fc.integer(), { minLength: 25, maxLength: 25 }), (list, keys) => {
        const order = list.map((_, i) => i).sort((i, j) => keys[i] - keys[j])
        const tau = kendallTauB(list.map((p) => p[0]), list.map((p) => p[1]))
        const reordered = kendallTauB(order.map((i) => list[i][0]), order.map((i) => list[i][1]))
        return Number.isNaN(tau) ? Number.isNaN(reordered) : Math.abs(tau - reordered) < 1e-12
      }),
    )
  })
})
