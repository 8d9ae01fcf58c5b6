import { describe, expect, it } from 'vitest'
import type { FeatureMatrix, FeatureInfo } from '../../../../src/core/data/dataset.ts'
import { UserError } from '../../../../src/core/errors.ts'
import { fitRidge } from '../../../../src/core/models/linear/fit-ridge.ts'
import type { LinearTerm } from '../../../../src/core/models/linear/linear-model.ts'

function matrixOf(columns: number[][], features?: FeatureInfo[]): FeatureMatrix {
  return {
    rows: columns[0].length,
    features: features ?? columns.map((_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const })),
    columns: columns.map((c) => Float64Array.from(c)),
  }
}

function coefficient(term: LinearTerm): number {
  if (term.kind !== 'numeric') throw new Error('expected a numeric term')
  return term.coefficient
}

// The 6-row least-squares example of the permutation-importance tests: X = [[0,1],[1,0],[2,1],[3,0],[4,1],[5,1]].
const checkX = matrixOf([
  [0, 1, 2, 3, 4, 5],
  [1, 0, 1, 0, 1, 1],
])
const checkY = Float64Array.of(1.2, 2.9, 5.1, 7.2, 8.8, 11.1)

describe('fitRidge(matrix, target, {l2})', () => {
  it('is ordinary least squares when l2 = 0', () => {
    // Derived: (b0, b1, b2) = (1.091791, 1.979104, 0.015672);
    // scikit-learn 1.2.1 LinearRegression gives 1.0917910447761185, 1.9791044776119406, 0.015671641791044653.
    const { state } = fitRidge(checkX, checkY, { l2: 0 })
    expect(state.intercept).toBeCloseTo(1.0917910447761185, 10)
    expect(coefficient(state.terms[0])).toBeCloseTo(1.9791044776119406, 10)
    expect(coefficient(state.terms[1])).toBeCloseTo(0.015671641791044653, 10)
  })

  it('matches scikit-learn Ridge(alpha = l2) on standardized inputs, folded back to raw values', () => {
    // Computed with scikit-learn 1.2.1: Ridge(alpha).fit(StandardScaler().fit_transform(X), y), then
    // coef / scale_ and intercept - sum(coef * mean_ / scale_). Ridge penalizes alpha ||w||^2 next to
    // the summed (not averaged) squared error, the same scaling as fitRidge's l2.
    const one = fitRidge(checkX, checkY, { l2: 1 }).state
    expect(one.intercept).toBeCloseTo(1.697742323901264, 10)
    expect(coefficient(one.terms[0])).toBeCloseTo(1.6872968091511138, 10)
    expect(coefficient(one.terms[1])).toBeCloseTo(0.20102347983142702, 10)
    const ten = fitRidge(checkX, checkY, { l2: 10 }).state
    expect(ten.intercept).toBeCloseTo(3.9756007186166626, 10)
    expect(coefficient(ten.terms[0])).toBeCloseTo(0.7348753649225241, 10)
    expect(coefficient(ten.terms[1])).toBeCloseTo(0.3558163036155401, 10)
  })

  it('has the one-feature closed form slope = Sxy / (Sxx + l2 var_n(x))', () => {
    // By hand: x = [1, 2, 3, 4], y = [2, 4, 5, 4]: Sxy = 3.5, Sxx = 5, var_n(x) = 1.25.
    // l2 = 1: slope 3.5 / 6.25 = 0.56, intercept 3.75 - 0.56 * 2.5 = 2.35.
    const { state } = fitRidge(matrixOf([[1, 2, 3, 4]]), Float64Array.of(2, 4, 5, 4), { l2: 1 })
    expect(coefficient(state.terms[0])).toBeCloseTo(0.56, 12)
    expect(state.intercept).toBeCloseTo(2.35, 12)
  })

  it('fills a missing value with the training mean, so it predicts as if the mean were there', () => {
    // The fit on [1, NaN, 3, 4, 7] equals the fit on the mean-imputed [1, 3.75, 3, 4, 7].
    const y = Float64Array.of(1, 2, 2, 5, 6)
    const withNaN = fitRidge(matrixOf([[1, NaN, 3, 4, 7]]), y, { l2: 0.5 })
    const imputed = fitRidge(matrixOf([[1, 3.75, 3, 4, 7]]), y, { l2: 0.5 })
    expect(withNaN.state.terms[0]).toEqual({ kind: 'numeric', coefficient: expect.closeTo(coefficient(imputed.state.terms[0]), 12), fill: 3.75 })
    expect(withNaN.state.intercept).toBeCloseTo(imputed.state.intercept, 12)
    const p = withNaN.predictRaw(matrixOf([[NaN, 3.75]]))
    expect(p[0]).toBeCloseTo(p[1], 12)
  })

  it('one-hot codes a categorical feature against its lowest code, like scikit-learn with drop="first"', () => {
    // Computed with scikit-learn 1.2.1: LinearRegression on [km, OneHotEncoder(drop='first')(depot)]:
    // intercept 3.85668053629219, km 2.0429958391123435, depot 1 0.58067498844198, depot 2 1.6675913083680052.
    const depot = [0, 0, 1, 1, 1, 2, 2, 2, 2, 0]
    const km = [3, 5, 2, 8, 6, 1, 9, 4, 7, 2]
    const y = Float64Array.of(10, 14, 9, 21, 16, 8, 25, 13, 19, 8)
    const features: FeatureInfo[] = [
      { name: 'km', kind: 'numeric' },
      { name: 'depot', kind: 'categorical', categories: ['east', 'north', 'west', 'harbour'] },
    ]
    const model = fitRidge(matrixOf([km, depot], features), y, { l2: 0 })
    const { intercept, terms } = model.state
    expect(intercept).toBeCloseTo(3.85668053629219, 10)
    expect(coefficient(terms[0])).toBeCloseTo(2.0429958391123435, 10)
    const depotTerm = terms[1]
    if (depotTerm.kind !== 'categorical') throw new Error('expected a categorical term')
    // Code 3 ('harbour') never occurs in training: it and NaN get the frequency-weighted mean
    // 0.3 * 0 + 0.3 * 0.58067 + 0.4 * 1.66759.
    const fill = 0.3 * 0.58067498844198 + 0.4 * 1.6675913083680052
    expect(depotTerm.coefficients).toEqual([0, 0.58067498844198, 1.6675913083680052, fill].map((v) => expect.closeTo(v, 10)))
    expect(depotTerm.fill).toBeCloseTo(fill, 10)
    const p = model.predictRaw(matrixOf([[1, 1], [2, NaN]], features))
    expect(p[0]).toBeCloseTo(3.85668053629219 + 2.0429958391123435 + 1.6675913083680052, 10)
    expect(p[1]).toBeCloseTo(3.85668053629219 + 2.0429958391123435 + fill, 10)
  })

  it('uses only the given rows and features; row order changes only rounding', () => {
    const data = matrixOf([
      [0, 1, 2, 3, 4, 5, 100],
      [1, 0, 1, 0, 1, 1, 100],
      [9, 9, 9, 1, 2, 3, 4],
    ])
    const y = Float64Array.of(1.2, 2.9, 5.1, 7.2, 8.8, 11.1, -50)
    const model = fitRidge(data, y, { l2: 0, rows: [5, 4, 3, 2, 1, 0], features: [1, 0] })
    expect(model.featureNames).toEqual(['x1', 'x2'])
    expect(model.state.intercept).toBeCloseTo(1.0917910447761185, 10)
    expect(coefficient(model.state.terms[0])).toBeCloseTo(1.9791044776119406, 10)
  })

  it('gives a constant feature a zero coefficient', () => {
    const { state } = fitRidge(matrixOf([[1, 2, 3], [5, 5, 5]]), Float64Array.of(1, 2, 3), { l2: 0 })
    expect(state.terms[1]).toEqual({ kind: 'numeric', coefficient: 0, fill: 5 })
    expect(coefficient(state.terms[0])).toBeCloseTo(1, 12)
  })

  it('refuses collinear features without a penalty, naming the feature', () => {
    const data = matrixOf([[1, 2, 3, 4], [2, 4, 6, 8]])
    const fit = () => fitRidge(data, Float64Array.of(1, 3, 2, 4), { l2: 0 })
    expect(fit).toThrow(UserError)
    expect(fit).toThrow(
      "fitRidge: 'x2' is a linear combination of the features before it on the training rows, so the unpenalized fit has no unique coefficients.",
    )
    expect(() => fitRidge(data, Float64Array.of(1, 3, 2, 4), { l2: 1e-3 })).not.toThrow()
  })

  it('refuses a negative penalty', () => {
    expect(() => fitRidge(checkX, checkY, { l2: -1 })).toThrow(new RangeError('fitRidge needs l2 >= 0, got -1'))
  })
})
