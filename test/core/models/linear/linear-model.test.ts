import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { LinearModel } from '../../../../src/core/models/linear/linear-model.ts'

const state = {
  task: 'regression' as const,
  featureNames: ['distance_km', 'depot'],
  intercept: 1,
  terms: [
    { kind: 'numeric' as const, coefficient: 2, fill: 10 },
    { kind: 'categorical' as const, coefficients: [0, 5], fill: 3 },
  ],
}

function matrix(distance: number[], depot: number[]): FeatureMatrix {
  return {
    rows: distance.length,
    features: [
      { name: 'depot', kind: 'categorical', categories: ['east', 'west'] },
      { name: 'distance_km', kind: 'numeric' },
    ],
    columns: [Float64Array.from(depot), Float64Array.from(distance)],
  }
}

describe('LinearModel', () => {
  it('predictRaw evaluates intercept + coefficient * x + coefficients[code], filling NaN and unknown codes', () => {
    // By hand: 1 + 2*3 + 5 = 12; 1 + 2*10 + 0 = 21 (NaN distance -> fill 10); 1 + 2*1 + 3 = 6 (code 7 -> fill).
    const p = new LinearModel(state).predictRaw(matrix([3, NaN, 1, 1], [1, 0, 7, NaN]))
    expect(Array.from(p)).toEqual([12, 21, 6, 6])
  })

  it('returns the logistic of the score for a binary task', async () => {
    // By hand: score 1 + 2*(-1) + 0 = -1 -> 1 / (1 + e) = 0.2689414213699951.
    const p = await new LinearModel({ ...state, task: 'binary' }).predict(matrix([-1], [0]))
    expect(p[0]).toBeCloseTo(0.2689414213699951, 12)
  })

  it('throws a RangeError naming a feature the matrix lacks', () => {
    const only: FeatureMatrix = { rows: 1, features: [{ name: 'depot', kind: 'numeric' }], columns: [Float64Array.of(0)] }
    expect(() => new LinearModel(state).predictRaw(only)).toThrow(
      new RangeError("LinearModel.predictRaw: the matrix has no feature named 'distance_km'"),
    )
  })
})
