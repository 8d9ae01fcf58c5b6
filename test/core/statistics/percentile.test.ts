import { describe, expect, it } from 'vitest'
import { percentile } from '../../../src/core/statistics/percentile.ts'

describe('percentile(values, p)', () => {
  it('interpolates linearly between order statistics (Hyndman & Fan type 7)', () => {
    // Computed with numpy 1.24.2 (next to SciPy 1.10.1): np.percentile([15,20,35,40,50], q).
    const values = [15, 20, 35, 40, 50]
    expect(percentile(values, 0)).toBe(15)
    expect(percentile(values, 5)).toBeCloseTo(16, 13)
    expect(percentile(values, 30)).toBeCloseTo(23, 13)
    expect(percentile(values, 40)).toBeCloseTo(29, 13)
    expect(percentile(values, 50)).toBe(35)
    expect(percentile(values, 62.5)).toBeCloseTo(37.5, 13)
    expect(percentile(values, 100)).toBe(50)
  })
  it('sorts unsorted input, including negative values and ties', () => {
    // Computed with numpy 1.24.2: np.percentile([3.2,-1,7.7,0.4,2.2,9.1], 37) and
    // np.percentile([2.5,-4,11,0,7.25,3,3], 90).
    expect(percentile([3.2, -1, 7.7, 0.4, 2.2, 9.1], 37)).toBeCloseTo(1.9300000000000002, 13)
    expect(percentile(new Float64Array([2.5, -4, 11, 0, 7.25, 3, 3]), 90)).toBeCloseTo(8.750000000000002, 13)
  })
  it('returns the value of a single-element sample at any p', () => {
    expect(percentile([5], 42)).toBe(5)
  })
  it('propagates NaN as numpy does', () => {
    expect(percentile([1, NaN, 3], 50)).toBeNaN()
  })
  it('refuses p outside 0..100 and an empty sample', () => {
    expect(() => percentile([1, 2], 0.5 * 300)).toThrow(new RangeError('percentile needs p from 0 to 100, got 150'))
    expect(() => percentile([], 50)).toThrow(new RangeError('percentile needs at least one value, got none'))
  })
})
