import { describe, expect, it } from 'vitest'
import { mae } from '../../../src/core/metrics/mae.ts'
import { regressionPrediction, regressionY } from './examples.ts'

describe('mae(y, prediction)', () => {
  it('matches scikit-learn mean_absolute_error', () => {
    // computed with scikit-learn 1.2.1: mean_absolute_error(regressionY, regressionPrediction) -> 0.7541666666666668
    expect(mae(regressionY, regressionPrediction)).toBeCloseTo(0.7541666666666668, 12)
    // By hand: (3 + 4) / 2.
    expect(mae([0, 0], [3, -4])).toBeCloseTo(3.5, 12)
  })

  it('is NaN for no rows or a NaN prediction', () => {
    expect(mae([], [])).toBeNaN()
    expect(mae([1], [NaN])).toBeNaN()
  })
})
