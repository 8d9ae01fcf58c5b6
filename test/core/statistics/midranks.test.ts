import { describe, expect, it } from 'vitest'
import { midranks } from '../../../src/core/statistics/midranks.ts'

describe('midranks(values)', () => {
  it('gives tied values the mean of the 1-based ranks they span', () => {
    // Computed with SciPy 1.10.1: scipy.stats.rankdata([3,1,4,1,5,9,2,6,5,3,5]) (method 'average').
    expect(Array.from(midranks([3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5]))).toEqual([
      4.5, 1.5, 6, 1.5, 8, 11, 3, 10, 8, 4.5, 8,
    ])
  })
  it('ranks a typed array and keeps input order', () => {
    // By hand: 10 < 20 = 20 < 30, so ranks 1, (2 + 3) / 2, (2 + 3) / 2, 4.
    expect(Array.from(midranks(new Float64Array([30, 20, 10, 20])))).toEqual([4, 2.5, 1, 2.5])
  })
  it('ranks infinities as the extremes and ties equal infinities', () => {
    // By hand: -Inf < 0 < Inf = Inf.
    expect(Array.from(midranks([Infinity, 0, -Infinity, Infinity]))).toEqual([3.5, 2, 1, 3.5])
  })
  it('returns an empty array for no values', () => {
    expect(midranks([]).length).toBe(0)
  })
  it('refuses NaN, naming its index', () => {
    expect(() => midranks([1, NaN])).toThrow(new RangeError('midranks cannot rank NaN (at index 1)'))
  })
})
