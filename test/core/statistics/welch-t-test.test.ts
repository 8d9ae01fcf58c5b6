import { describe, expect, it } from 'vitest'
import { welchTTest, welchTTestFromSummary } from '../../../src/core/statistics/welch-t-test.ts'

describe('welchTTest(x, y)', () => {
  it('reproduces the Welch row of the check values', () => {
    // Welch test, computed: x = 1..5, y = 2..10, where y is 2, 4, 6, 8, 10 (step 2; the
    // nine values 2..10 give t = −2.598 instead). SciPy 1.10.1 ttest_ind(equal_var=False) gives
    // p = 0.10753119493062718, SciPy 1.17.1 gives 0.10753119493062728.
    const result = welchTTest([1, 2, 3, 4, 5], [2, 4, 6, 8, 10])
    expect(result.t).toBeCloseTo(-1.8973665961010275, 14)
    expect(result.df).toBeCloseTo(5.882352941176471, 14)
    expect(result.pValue).toBeCloseTo(0.10753119493062728, 14)
    expect(result.meanDifference).toBeCloseTo(-3, 15)
    expect(result.standardError).toBeCloseTo(Math.sqrt(2.5), 15)
  })
  it('handles unequal group sizes', () => {
    // Computed with SciPy 1.10.1: ttest_ind([1..5], [2..10], equal_var=False).
    const result = welchTTest([1, 2, 3, 4, 5], [2, 3, 4, 5, 6, 7, 8, 9, 10])
    expect(result.t).toBeCloseTo(-2.5980762113533156, 14)
    expect(result.pValue).toBeCloseTo(0.02343367511014965, 14)
  })
  it('uses n − 1 as df when one group is constant', () => {
    // Derived: v2 = 0 makes df = v1² / (v1² / (n1 − 1)) = n1 − 1.
    expect(welchTTest([1, 2, 4, 8], [3, 3, 3]).df).toBeCloseTo(3, 14)
  })
  it('refuses fewer than two values per sample and NaN', () => {
    expect(() => welchTTest([1], [1, 2])).toThrow(
      new RangeError('welchTTest needs at least two values per sample, got 1 and 2'),
    )
    expect(() => welchTTest([1, 2], [1, NaN])).toThrow(
      new RangeError('welchTTest cannot use NaN (y[1]); drop missing values first'),
    )
  })
})

describe('welchTTestFromSummary(a, b)', () => {
  it('reproduces the NIST car-mileage example', () => {
    // NIST/SEMATECH e-Handbook §1.3.5.3 car-mileage example (summary statistics from memory):
    // t = −12.946268, ν = 136.875. SciPy 1.10.1 ttest_ind_from_stats(..., equal_var=False):
    // t = −12.946267565658848, p = 1.5709046154648287e-25; ν computed 136.8749900936937.
    const result = welchTTestFromSummary({ mean: 20.14458, sd: 6.4147, n: 249 }, { mean: 30.48101, sd: 6.10771, n: 79 })
    expect(result.t).toBeCloseTo(-12.946268, 6)
    expect(result.t).toBeCloseTo(-12.946267565658848, 12)
    expect(result.df).toBeCloseTo(136.875, 4)
    expect(result.df).toBeCloseTo(136.8749900936937, 10)
    expect(result.pValue / 1.5709046154648287e-25).toBeCloseTo(1, 11)
  })
  it('gives t = 0 and p = 1 when both groups are constant and equal', () => {
    expect(welchTTestFromSummary({ mean: 2, sd: 0, n: 3 }, { mean: 2, sd: 0, n: 5 })).toEqual({
      t: 0,
      df: NaN,
      pValue: 1,
      meanDifference: 0,
      standardError: 0,
    })
  })
  it('gives an infinite t and p = 0 when both groups are constant and differ', () => {
    const result = welchTTestFromSummary({ mean: 1, sd: 0, n: 3 }, { mean: 2, sd: 0, n: 5 })
    expect(result.t).toBe(-Infinity)
    expect(result.pValue).toBe(0)
    expect(result.df).toBeNaN()
  })
  it('refuses groups of fewer than two and negative standard deviations', () => {
    expect(() => welchTTestFromSummary({ mean: 1, sd: 1, n: 1 }, { mean: 1, sd: 1, n: 4 })).toThrow(
      new RangeError('welchTTestFromSummary needs n >= 2 (a whole number) in the first group, got 1'),
    )
    expect(() => welchTTestFromSummary({ mean: 1, sd: 1, n: 4 }, { mean: 1, sd: -1, n: 4 })).toThrow(
      new RangeError('welchTTestFromSummary needs a finite sd >= 0 in the second group, got -1'),
    )
  })
})
