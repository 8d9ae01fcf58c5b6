import { describe, expect, it } from 'vitest'
import { rSquared } from '../../../src/core/metrics/r-squared.ts'
import { regressionPrediction, regressionY } from './examples.ts'

describe('rSquared(y, prediction)', () => {
  it('matches scikit-learn r2_score', () => {
    // computed with scikit-learn 1.2.1: r2_score(regressionY, regressionPrediction) -> 0.9347084481571464
    expect(rSquared(regressionY, regressionPrediction)).toBeCloseTo(0.9347084481571464, 12)
  })

  it('is 0 for predicting the mean and negative for worse', () => {
    // By hand: y = [1, 2, 3], mean 2; SS_tot = 2. Predicting 2 everywhere -> 0; predicting [3, 2, 1] -> 1 - 8/2 = -3.
    expect(rSquared([1, 2, 3], [2, 2, 2])).toBeCloseTo(0, 12)
    expect(rSquared([1, 2, 3], [3, 2, 1])).toBeCloseTo(-3, 12)
  })

  it('is NaN for a constant y, where scikit-learn 1.2.1 returns 0.0 or 1.0', () => {
    // scikit-learn 1.2.1: r2_score([2,2,2], [1,2,3]) -> 0.0 and r2_score([2,2,2], [2,2,2]) -> 1.0 (force_finite=True).
    expect(rSquared([2, 2, 2], [1, 2, 3])).toBeNaN()
    expect(rSquared([0.1, 0.1, 0.1], [0.1, 0.1, 0.1])).toBeNaN()
    expect(rSquared([], [])).toBeNaN()
  })
})
