import { describe, expect, it } from 'vitest'
import { rmse } from '../../../src/core/metrics/rmse.ts'
import { regressionPrediction, regressionY } from './examples.ts'

describe('rmse(y, prediction)', () => {
  it('matches scikit-learn mean_squared_error(squared=False)', () => {
    // computed with scikit-learn 1.2.1: mean_squared_error(regressionY, regressionPrediction, squared=False) -> 0.8501225401866094
    expect(rmse(regressionY, regressionPrediction)).toBeCloseTo(0.8501225401866094, 12)
    // By hand: errors 3 and 4 -> sqrt((9 + 16) / 2).
    expect(rmse([0, 0], [3, -4])).toBeCloseTo(Math.sqrt(12.5), 12)
  })

  it('is NaN for no rows and throws a RangeError for unpaired input', () => {
    expect(rmse([], [])).toBeNaN()
    expect(() => rmse([1, 2], [1])).toThrow('rmse needs paired samples, got 2 targets and 1 predictions')
  })
})
