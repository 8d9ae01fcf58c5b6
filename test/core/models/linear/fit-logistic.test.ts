import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { UserError } from '../../../../src/core/errors.ts'
import { fitLogistic } from '../../../../src/core/models/linear/fit-logistic.ts'
import type { LinearModel } from '../../../../src/core/models/linear/linear-model.ts'
import { breastCancerCsv, missingReference } from '../../../helpers/reference-packages.ts'

// Debian's python3-sklearn ships the Wisconsin breast-cancer data (569 rows, 30 features). Its first
// line is "569,30,malignant,benign"; then 30 feature values and the target (0 malignant, 1 benign).
const BREAST_CANCER = breastCancerCsv
const hasBreastCancer = missingReference('python3-sklearn', 'test/core/models/linear/fit-logistic.test.ts', 'the breast-cancer fits') === undefined

function readBreastCancer(): { matrix: FeatureMatrix; y: Float64Array } {
  const lines = readFileSync(BREAST_CANCER, 'utf8').trim().split('\n').slice(1)
  const rows = lines.map((line) => line.split(',').map(Number))
  const columns = Array.from({ length: 30 }, (_, j) => Float64Array.from(rows, (r) => r[j]))
  const features = columns.map((_, j) => ({ name: `f${j}`, kind: 'numeric' as const }))
  return { matrix: { rows: rows.length, features, columns }, y: Float64Array.from(rows, (r) => r[30]) }
}

/** The intercept and slopes on the standardized scale (x - mean) / sd, sd with divisor n. */
function standardizedCoefficients(model: LinearModel, matrix: FeatureMatrix): { intercept: number; slopes: number[] } {
  let intercept = model.state.intercept
  const slopes = model.state.terms.map((term, j) => {
    if (term.kind !== 'numeric') throw new Error('expected numeric terms')
    const x = matrix.columns[j]
    const mean = x.reduce((a, b) => a + b, 0) / x.length
    const sd = Math.sqrt(x.reduce((a, b) => a + (b - mean) ** 2, 0) / x.length)
    intercept += term.coefficient * mean
    return term.coefficient * sd
  })
  return { intercept, slopes }
}

// Computed with scikit-learn 1.2.1: LogisticRegression(C, solver='newton-cholesky', tol=1e-14,
// max_iter=100000).fit(StandardScaler().fit_transform(X), y) on the breast-cancer file (max |gradient|
// at the solution < 4e-15). sklearn minimizes C * sum(log loss) + ||w||^2 / 2, which is fitLogistic's
// sum(log loss) + (l2 / 2) ||w||^2 with l2 = 1 / C, and StandardScaler is the same standardization
// fitLogistic applies inside, so the coefficients compare on the standardized scale.
const SKLEARN = {
  'C = 1': {
    l2: 1,
    intercept: 0.21450271740174937,
    slopes: [
      -0.3630925319179316, -0.38767544241875795, -0.3510621186796741, -0.4356098032859758, -0.1618311028152455,
      0.5626540336981026, -0.8599171195924011, -0.962280223488176, 0.07620903147902897, 0.32222623694861136,
      -1.2909422896744203, 0.26892190138788774, -0.6599745965624585, -1.0125577321802826, -0.27721295890401515,
      0.7363240127967531, 0.11053932078141052, -0.3334076188831648, 0.2957930259031852, 0.6809196730583749,
      -1.0292622616479528, -1.3146076344464532, -0.8233473825766975, -1.0107068321134165, -0.6706819627765847,
      0.04456425178742121, -0.87333391652225, -0.9120031219319646, -0.8878373243070151, -0.47981890804315985,
    ],
    firstProbabilities: [1.2077509568189484e-9, 3.200439338186011e-5, 1.6325077959775626e-7],
  },
  'C = 0.05': {
    l2: 20,
    intercept: 0.5795155245102079,
    slopes: [
      -0.3461730591263541, -0.3522069131814511, -0.33823514474638805, -0.32857417197463157, -0.13731855028151052,
      -0.04485434533550219, -0.2971378266160162, -0.3758206488005877, -0.07294823363762538, 0.20209511240672903,
      -0.36460219261959437, 0.026781591675877785, -0.2799441806122941, -0.2917916967294818, -0.026193606517615698,
      0.16641425244744357, 0.04469458756416189, -0.10639708706140091, 0.1071617459256363, 0.1943509686354752,
      -0.44041177324455705, -0.46885511383667344, -0.41124080435464594, -0.39174531673820606, -0.3404298234200185,
      -0.1569255664324509, -0.32621172567780643, -0.4306016419098257, -0.33359201352410084, -0.1167345343219206,
    ],
    firstProbabilities: [0.00010219969020344842, 0.013590845505809109, 0.0006806104219892048],
  },
}

describe.skipIf(!hasBreastCancer)(`fitLogistic on breast cancer (needs ${BREAST_CANCER} from Debian python3-sklearn)`, () => {
  const data = hasBreastCancer ? readBreastCancer() : undefined
  for (const [label, reference] of Object.entries(SKLEARN)) {
    it(`matches scikit-learn LogisticRegression(${label}) on standardized inputs`, () => {
      const model = fitLogistic(data!.matrix, data!.y, { l2: reference.l2 })
      expect(model.convergence?.converged).toBe(true)
      const { intercept, slopes } = standardizedCoefficients(model, data!.matrix)
      expect(intercept).toBeCloseTo(reference.intercept, 8)
      slopes.forEach((slope, j) => expect(slope).toBeCloseTo(reference.slopes[j], 8))
      const p = model.predictRaw(data!.matrix)
      reference.firstProbabilities.forEach((q, i) => expect(p[i] / q).toBeCloseTo(1, 6))
    })
  }

  it('gives the same fit whatever the row order', () => {
    const forward = fitLogistic(data!.matrix, data!.y, { l2: 1 }).state
    const rows = Array.from({ length: data!.matrix.rows }, (_, i) => data!.matrix.rows - 1 - i)
    const backward = fitLogistic(data!.matrix, data!.y, { l2: 1, rows }).state
    expect(backward.intercept).toBeCloseTo(forward.intercept, 8)
    backward.terms.forEach((term, j) => {
      const a = forward.terms[j]
      if (term.kind !== 'numeric' || a.kind !== 'numeric') throw new Error('expected numeric terms')
      expect(term.coefficient / a.coefficient).toBeCloseTo(1, 8)
    })
  })
})

function matrixOf(...columns: number[][]): FeatureMatrix {
  return {
    rows: columns[0].length,
    features: columns.map((_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const })),
    columns: columns.map((c) => Float64Array.from(c)),
  }
}

describe('fitLogistic(matrix, target, {l2})', () => {
  it('without features is the log-odds of the positive rate', () => {
    // By hand: 3 of 4 positive -> intercept log(3) = 1.0986122886681098, probability 0.75.
    const model = fitLogistic(matrixOf([5, 5, 5, 5]), Float64Array.of(1, 1, 0, 1), { l2: 1 })
    expect(model.state.intercept).toBeCloseTo(1.0986122886681098, 10)
    expect(model.predictRaw(matrixOf([5]))[0]).toBeCloseTo(0.75, 10)
  })

  it('sets the gradient to zero: predicted positives equal observed positives (unpenalized intercept)', () => {
    // Stationarity in b0: sum(p - y) = 0, whatever l2 does to the slopes.
    const x = [0.1, 0.5, 0.9, 1.3, 1.7, 2.1, 2.5, 2.9]
    const y = Float64Array.of(0, 0, 1, 0, 1, 0, 1, 1)
    const p = fitLogistic(matrixOf(x), y, { l2: 3 }).predictRaw(matrixOf(x))
    expect(p.reduce((a, b) => a + b, 0)).toBeCloseTo(4, 10)
  })

  it('stops at maxIterations without converging on separable data with l2 = 0', () => {
    const model = fitLogistic(matrixOf([1, 2, 3, 4]), Float64Array.of(0, 0, 1, 1), { l2: 0, maxIterations: 20 })
    expect(model.convergence?.converged).toBe(false)
    const p = model.predictRaw(matrixOf([1, 4]))
    expect(p[0]).toBeLessThan(0.01)
    expect(p[1]).toBeGreaterThan(0.99)
  })

  it('refuses collinear features without a penalty', () => {
    const fit = () => fitLogistic(matrixOf([1, 2, 3, 4, 5], [3, 5, 7, 9, 11]), Float64Array.of(0, 1, 0, 1, 1), { l2: 0 })
    expect(fit).toThrow(UserError)
    expect(fit).toThrow("fitLogistic: 'x2' is a linear combination of the features before it")
  })

  it('refuses a target that is not 0 or 1', () => {
    expect(() => fitLogistic(matrixOf([1, 2]), Float64Array.of(0, 0.5), { l2: 1 })).toThrow(
      new RangeError('fitLogistic: target of row 1 is 0.5; binary targets must be 0 or 1'),
    )
  })
})
