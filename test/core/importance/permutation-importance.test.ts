import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../src/core/data/dataset.ts'
import { selectRows } from '../../../src/core/data/dataset.ts'
import { permutationImportance } from '../../../src/core/importance/permutation-importance.ts'
import { metricByName } from '../../../src/core/metrics/metric-by-name.ts'
import { fitRidge } from '../../../src/core/models/linear/fit-ridge.ts'
import { LinearModel, type LinearTerm } from '../../../src/core/models/linear/linear-model.ts'
import type { Model } from '../../../src/core/models/model.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'
import { enumeratePermutationDraws, meanAndVariance, meanSquaredError } from './enumerate-permutation-draws.ts'

type Evaluation = FeatureMatrix & { readonly target: { readonly name: string; readonly values: Float64Array } }

function evaluationOf(columns: Record<string, ArrayLike<number>>, y: ArrayLike<number>): Evaluation {
  const names = Object.keys(columns)
  return {
    rows: y.length,
    features: names.map((name) => ({ name, kind: 'numeric' as const })),
    columns: names.map((name) => Float64Array.from(columns[name])),
    target: { name: 'y', values: Float64Array.from(y) },
  }
}

/** A model from a plain function of the row's named values (one call per row). */
function functionModel(featureNames: string[], f: (row: Record<string, number>) => number, task: 'regression' | 'binary' = 'regression'): Model {
  return {
    kind: 'test-function',
    task,
    featureNames,
    predict: async (matrix) => {
      const out = new Float64Array(matrix.rows)
      for (let i = 0; i < matrix.rows; i++) {
        const row: Record<string, number> = {}
        matrix.features.forEach((feature, j) => (row[feature.name] = matrix.columns[j][i]))
        out[i] = f(row)
      }
      return out
    },
  }
}

function coefficient(term: LinearTerm): number {
  if (term.kind !== 'numeric') throw new Error('expected a numeric term')
  return term.coefficient
}

/** Sum of squares about the mean, SS(v) = Σ (v_i − mean)². */
function sumOfSquares(v: ArrayLike<number>): number {
  let m = 0
  for (let i = 0; i < v.length; i++) m += v[i]
  m /= v.length
  let s = 0
  for (let i = 0; i < v.length; i++) s += (v[i] - m) ** 2
  return s
}

/** cov_n(a, b) with divisor n. */
function covarianceN(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length
  let ma = 0
  let mb = 0
  for (let i = 0; i < n; i++) {
    ma += a[i]
    mb += b[i]
  }
  ma /= n
  mb /= n
  let s = 0
  for (let i = 0; i < n; i++) s += (a[i] - ma) * (b[i] - mb)
  return s / n
}

/** The linear permutation statistic (derived) for f = g(x_j) + h(rest), r = y − h: ΔMSE(π) = (2/n) Σ r_i (g_i − g_π(i)). */
function linearPermutationStatistic(r: ArrayLike<number>, g: ArrayLike<number>, gPermuted: ArrayLike<number>): number {
  let s = 0
  for (let i = 0; i < r.length; i++) s += r[i] * (g[i] - gPermuted[i])
  return (2 / r.length) * s
}

describe('permutationImportance(model, evaluation, {metric, draws, seed}): exact permutation distributions', () => {
  // ΔMSE over all 24 permutations (exact; derived, enumerated): x = [1,2,3,4], f = 2x, y = f.
  const x = [1, 2, 3, 4]
  const doubling = new LinearModel({ task: 'regression', featureNames: ['x'], intercept: 0, terms: [{ kind: 'numeric', coefficient: 2, fill: 2.5 }] })
  const evaluation = evaluationOf({ x }, x.map((v) => 2 * v))

  for (const path of ['the evaluation rows themselves', 'a reference that reorders them'] as const) {
    it(`gives mean 10 and variance 33.333… over all 24 permutations of x = [1,2,3,4] for f = 2x, drawing from ${path}`, async () => {
      const reference = path === 'the evaluation rows themselves' ? undefined : evaluationOf({ x: [...x].reverse() }, [0, 0, 0, 0])
      const draws = (await enumeratePermutationDraws(doubling, evaluation, { metric: meanSquaredError, reference, drawsPerCall: 50 })).get('x')!
      expect(draws).toHaveLength(24)
      const { mean, variance } = meanAndVariance(draws.map((d) => d.importance))
      // Derived; enumerated: mean 10 = 2·b²·var_n(x) = 2·4·1.25, variance 33.3333…, SD 5.7735027.
      expect(mean).toBeCloseTo(10, 12)
      expect(variance).toBeCloseTo(100 / 3, 12)
      expect(Math.sqrt(variance)).toBeCloseTo(5.7735027, 7)
    })
  }

  it('gives every single draw the value of the linear permutation statistic (2/n) Σ r_i (g_i − g_π(i))', async () => {
    // The linear permutation statistic identity (derived): here h = 0, so r = y = 2x and g = 2x.
    const draws = (await enumeratePermutationDraws(doubling, evaluation, { metric: meanSquaredError, drawsPerCall: 50 })).get('x')!
    const g = x.map((v) => 2 * v)
    for (const draw of draws) {
      const gPermuted = Array.from(draw.columns[0], (v) => 2 * v)
      expect(draw.importance).toBeCloseTo(linearPermutationStatistic(g, g, gPermuted), 12)
    }
  })

  it('gives mean ΔMSE 22.848318 and variance 104.603623 for x1 of the 6-row least-squares example over all 720 permutations', async () => {
    // ΔMSE over all 720 permutations of x1 (exact; derived, enumerated);
    // recomputed with NumPy (numpy.linalg.lstsq and itertools.permutations) for /usr/bin/python3:
    // mean 22.848318110937836, variance 104.60362298672605.
    const data = evaluationOf({ x1: [0, 1, 2, 3, 4, 5], x2: [1, 0, 1, 0, 1, 1] }, [1.2, 2.9, 5.1, 7.2, 8.8, 11.1])
    const model = fitRidge(data, data.target.values, { l2: 0 })
    // Ordinary least squares, derived: (b0, b1, b2) = (1.091791, 1.979104, 0.015672)
    // (scikit-learn 1.2.1 LinearRegression agrees; see test/core/models/linear/fit-ridge.test.ts).
    expect(model.state.intercept).toBeCloseTo(1.091791, 6)
    expect(coefficient(model.state.terms[0])).toBeCloseTo(1.979104, 6)
    expect(coefficient(model.state.terms[1])).toBeCloseTo(0.015672, 6)

    const enumerated = await enumeratePermutationDraws(model, data, { metric: meanSquaredError, drawsPerCall: 1000 })
    const x1 = enumerated.get('x1')!
    expect(x1).toHaveLength(720)
    const { mean, variance } = meanAndVariance(x1.map((d) => d.importance))
    expect(mean).toBeCloseTo(22.848318, 6)
    expect(variance).toBeCloseTo(104.603623, 6)

    // The same two numbers from the identity's closed forms (derived, linear permutation statistic):
    // E = 2·cov_n(r, g) and Var = 4·SS(r)·SS(g) / (n²(n − 1)), with g = b1·x1 and r = y − b0 − b2·x2.
    const b1 = coefficient(model.state.terms[0])
    const b2 = coefficient(model.state.terms[1])
    const g = Array.from(data.columns[0], (v) => b1 * v)
    const r = Array.from(data.target.values, (y, i) => y - model.state.intercept - b2 * data.columns[1][i])
    expect(mean).toBeCloseTo(2 * covarianceN(r, g), 10)
    expect(variance).toBeCloseTo((4 * sumOfSquares(r) * sumOfSquares(g)) / (36 * 5), 10)

    // x2 = [1,0,1,0,1,1] has ties: 6! / (4! 2!) = 15 distinct columns, each as likely, and the same closed form.
    const x2 = enumerated.get('x2')!
    expect(x2).toHaveLength(15)
    const g2 = Array.from(data.columns[1], (v) => b2 * v)
    const r2 = Array.from(data.target.values, (y, i) => y - model.state.intercept - b1 * data.columns[0][i])
    expect(meanAndVariance(x2.map((d) => d.importance)).mean).toBeCloseTo(2 * covarianceN(r2, g2), 12)
  })
})

describe('permutationImportance(model, evaluation, {metric, draws, seed}): known expectations', () => {
  it('matches 2·b²·Var(x) plus 2·b·Cov(residual, x) for a ridge model on simulated linear data', async () => {
    // Simulation: y = 1 + 3·x1 − 1·x2 + 2·x3 + ε, x ~ N(0, σ²) with σ = (1, 2, 0.5), ε ~ N(0, 1), 4000 rows.
    const n = 4000
    const b = [3, -1, 2]
    const sigma = [1, 2, 0.5]
    const random = createRandom(20240601)
    const columns = sigma.map(() => new Float64Array(n))
    const y = new Float64Array(n)
    for (let i = 0; i < n; i++) {
      y[i] = 1 + random.normal()
      for (let j = 0; j < 3; j++) {
        columns[j][i] = sigma[j] * random.normal()
        y[i] += b[j] * columns[j][i]
      }
    }
    const data = evaluationOf({ x1: columns[0], x2: columns[1], x3: columns[2] }, y)
    const model = fitRidge(data, y, { l2: 1 })
    const prediction = await model.predict(data)
    const residual = Array.from(y, (v, i) => v - prediction[i])
    const draws = 30
    const result = await permutationImportance(model, data, { metric: meanSquaredError, draws, seed: 5 })

    for (let j = 0; j < 3; j++) {
      const bj = coefficient(model.state.terms[j])
      const xj = columns[j]
      // Fisher, Rudin & Dominici (2019), JMLR 20(177), model reliance of a linear model
      // (closed form): 2·b²·Var(x) + 2·b·Cov(residual, x), here with the evaluation rows' own
      // var_n and cov_n, which is exactly the mean over all permutations (E = 2·cov_n(r, g) with
      // r = b·x + residual, g = b·x). Ridge's shrinkage makes the Cov term small but not zero.
      const expected = 2 * bj * bj * covarianceN(xj, xj) + 2 * bj * covarianceN(residual, xj)
      // Tolerance from the linear permutation statistic's variance (derived): one draw has variance
      // Var = 4·SS(r)·SS(g) / (n²(n − 1)) around that mean, so the mean of K draws has standard error
      // sqrt(Var / K); 4 standard errors (a normal tail of 6e-5) is the bound.
      const g = Array.from(xj, (v) => bj * v)
      const r = Array.from(xj, (v, i) => bj * v + residual[i])
      const standardError = Math.sqrt((4 * sumOfSquares(r) * sumOfSquares(g)) / (n * n * (n - 1)) / draws)
      const estimate = result.importances[j]
      expect(estimate.name).toBe(`x${j + 1}`)
      expect(Math.abs(estimate.mean - expected)).toBeLessThanOrEqual(4 * standardError)
      // And the population form with the simulation's own b and σ: 2·b²·σ² (18, 8, 2). Relative error
      // sources (delta method, derived): var_n(x) has relative SD sqrt(2/n) for normal x; b̂ has SD
      // σ_ε / (σ·sqrt(n)), so b̂² has relative SD 2·σ_ε / (|b|·σ·sqrt(n)). The bound is 4 combined SDs
      // (10% for x1, 8.9% for x2, 15.5% for x3); the draw noise above is an order of magnitude smaller.
      const relativeSd = Math.sqrt(2 / n + (2 / (Math.abs(b[j]) * sigma[j] * Math.sqrt(n))) ** 2)
      expect(Math.abs(estimate.mean / (2 * b[j] ** 2 * sigma[j] ** 2) - 1)).toBeLessThanOrEqual(4 * relativeSd)
    }
  })

  it('gives accuracy importance 0.5 with SD 0.2236 for the hypergeometric example, and exactly 0 for constant columns', async () => {
    // Accuracy permutation importance, analytic (derived): after a shuffle of column 1 the accuracy is
    // k/3 with k ~ Hypergeometric(6, 3, 3), so the importance is 1 − k/3: mean 0.5, SD 0.2236068.
    const data = evaluationOf({ x1: [1, 1, 1, 0, 0, 0], x2: [9, 9, 9, 9, 9, 9], x3: [9, 9, 9, 9, 9, 9] }, [1, 1, 1, 0, 0, 0])
    const model = functionModel(['x1', 'x2', 'x3'], (row) => row.x1, 'binary')
    // K = 40 000 draws: the mean's standard error is 0.2236068 / 200 = 0.00112, so 4.5 standard errors
    // fit inside toBeCloseTo(·, 2) (|difference| < 0.005). The SD's standard error is smaller still.
    const result = await permutationImportance(model, data, { metric: metricByName('accuracy', 'binary'), draws: 40_000, seed: 3 })
    const [x1, x2, x3] = result.importances
    expect(result.score).toBe(1)
    expect(x1.mean).toBeCloseTo(0.5, 2)
    expect(x1.sd).toBeCloseTo(0.2236068, 2)
    expect(new Set(x1.draws.map((v) => Math.round(v * 3)))).toEqual(new Set([0, 1, 2, 3]))
    for (const constant of [x2, x3]) {
      expect(constant.draws.every((v) => v === 0)).toBe(true)
      expect([constant.mean, constant.sd, constant.lower, constant.upper]).toEqual([0, 0, 0, 0])
    }
  })

  it('gives a constant model exactly zero for every feature and group, with or without a reference', async () => {
    // A model that ignores its inputs: every importance exactly 0 (as in scikit-learn's test suite, dummy classifier case).
    const random = createRandom(8)
    const column = () => Array.from({ length: 50 }, () => random.normal())
    const data = evaluationOf({ a: column(), b: column(), c: column() }, Array.from({ length: 50 }, (_, i) => i % 2))
    const reference = evaluationOf({ c: column(), a: column(), b: column() }, new Array(50).fill(0))
    const constant = functionModel(['a', 'b', 'c'], () => 0.3, 'binary')
    for (const options of [{}, { reference }, { reference: selectRows(reference, [0, 1, 2]) }]) {
      const result = await permutationImportance(constant, data, {
        metric: metricByName('log-loss', 'binary'),
        draws: 4,
        seed: 1,
        groups: [{ name: 'a and b', members: ['a', 'b'] }],
        ...options,
      })
      expect(result.importances.map((u) => u.name)).toEqual(['a', 'b', 'c', 'a and b'])
      for (const unit of result.importances) {
        expect(unit.draws).toEqual([0, 0, 0, 0])
        expect([unit.mean, unit.sd, unit.lower, unit.upper]).toEqual([0, 0, 0, 0])
      }
    }
  })
})

describe('permutationImportance(model, evaluation, {groups})', () => {
  /** A model that keeps a copy of every matrix it is asked about. */
  function recording(model: Model): { model: Model; calls: FeatureMatrix[] } {
    const calls: FeatureMatrix[] = []
    return {
      calls,
      model: {
        kind: model.kind,
        task: model.task,
        featureNames: model.featureNames,
        predict: async (matrix) => {
          calls.push({ rows: matrix.rows, features: matrix.features, columns: matrix.columns.map((c) => c.slice()) })
          return model.predict(matrix)
        },
      },
    }
  }

  it('permutes a group jointly: every row takes both members from one reference row', async () => {
    const random = createRandom(17)
    const n = 40
    const x2 = Array.from({ length: n }, () => random.normal())
    const x1 = x2.map((v) => v + random.normal())
    const x3 = Array.from({ length: n }, () => random.normal())
    const data = evaluationOf({ x1, x2, x3 }, x1.map((v, i) => v - x2[i] + x3[i]))
    const m = 60
    const refX2 = Array.from({ length: m }, () => random.normal())
    const refX1 = refX2.map((v) => v + random.normal())
    const reference = evaluationOf({ x3: refX2.map(() => random.normal()), x1: refX1, x2: refX2 }, new Array(m).fill(0))
    const difference = functionModel(['x1', 'x2', 'x3'], (row) => row.x1 - row.x2 + row.x3)
    const draws = 3

    for (const [sourceX1, sourceX2, options] of [
      [x1, x2, {}],
      [refX1, refX2, { reference }],
      [refX1.slice(0, 10), refX2.slice(0, 10), { reference: selectRows(reference, Array.from({ length: 10 }, (_, i) => i)) }],
    ] as const) {
      const { model, calls } = recording(difference)
      const result = await permutationImportance(model, data, {
        metric: meanSquaredError,
        draws,
        seed: 2,
        groups: [{ name: 'route', members: ['x1', 'x2'] }],
        ...options,
      })
      // One call for the score, then one batched call of K·n rows per unit (x1, x2, x3, route).
      expect(calls.map((c) => c.rows)).toEqual([n, n * draws, n * draws, n * draws, n * draws])
      const route = result.importances[3]
      expect(route).toMatchObject({ name: 'route', members: ['x1', 'x2'], isGroup: true })
      const groupCall = calls[4]
      const sourceRow = new Map(sourceX1.map((v, s) => [v, s]))
      for (let i = 0; i < n * draws; i++) {
        const s = sourceRow.get(groupCall.columns[0][i])
        expect(s).toBeDefined()
        expect(groupCall.columns[1][i]).toBe(sourceX2[s!])
        expect(groupCall.columns[2][i]).toBe(x3[i % n])
      }
    }
  })

  it('keeps within-row structure: a model of x1 − x2 loses nothing when x1 and x2 move together', async () => {
    // x1 = x2 + 1 on every row, in eighths so that x1 − x2 is exactly 1 in floating point; y = 1 + x3.
    const random = createRandom(4)
    const n = 64
    const x2 = Array.from({ length: n }, () => random.int(200) / 8)
    const x1 = x2.map((v) => v + 1)
    const x3 = Array.from({ length: n }, () => random.int(200) / 8)
    const data = evaluationOf({ x1, x2, x3 }, x3.map((v) => 1 + v))
    const model = functionModel(['x1', 'x2', 'x3'], (row) => row.x1 - row.x2 + row.x3)
    const result = await permutationImportance(model, data, {
      metric: meanSquaredError,
      draws: 5,
      seed: 9,
      groups: [
        { name: 'pair', members: ['x1', 'x2'] },
        { name: 'unused member', members: ['x1', 'distance_km'] },
      ],
    })
    const byName = new Map(result.importances.map((u) => [u.name, u]))
    expect([...byName.keys()]).toEqual(['x1', 'x2', 'x3', 'pair'])
    expect(result.score).toBe(0)
    expect(byName.get('pair')!.draws).toEqual([0, 0, 0, 0, 0])
    expect(byName.get('x1')!.mean).toBeGreaterThan(10)
    expect(byName.get('x2')!.mean).toBeGreaterThan(10)
  })
})

describe('permutationImportance(model, evaluation, options): what must not change the answer', () => {
  const smallColumn = (rows: number) => fc.array(fc.integer({ min: -3, max: 3 }), { minLength: rows, maxLength: rows })
  const nonlinear = (names: string[]) =>
    functionModel(names, (row) => names.reduce((s, name, j) => s + (j + 1) * row[name] + (j === 0 ? Math.sin(row[name] * row[names[names.length - 1]]) : 0), 0))

  it('does not depend on the column order of the evaluation and reference data (bit for bit)', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: 2, max: 8 }).chain((rows) =>
          fc.record({
            columns: fc.array(smallColumn(rows), { minLength: 2, maxLength: 4 }),
            reference: fc.array(smallColumn(rows + 2), { minLength: 4, maxLength: 4 }),
            y: smallColumn(rows),
            order: fc.shuffledSubarray([0, 1, 2, 3], { minLength: 4, maxLength: 4 }),
            seed: fc.integer({ min: 0, max: 1000 }),
          }),
        ),
        async ({ columns, reference, y, order, seed }) => {
          const names = columns.map((_, j) => `f${j}`)
          const model = nonlinear(names)
          const keep = order.filter((j) => j < columns.length)
          const asGiven = evaluationOf(Object.fromEntries(names.map((name, j) => [name, columns[j]])), y)
          const reordered = evaluationOf(Object.fromEntries(keep.map((j) => [names[j], columns[j]])), y)
          const referenceAsGiven = evaluationOf(Object.fromEntries(names.map((name, j) => [name, reference[j]])), reference[0])
          const referenceReordered = evaluationOf(Object.fromEntries(keep.map((j) => [names[j], reference[j]])), reference[0])
          const options = { metric: meanSquaredError, draws: 3, seed, groups: [{ name: 'g', members: names.slice(0, 2) }] }
          expect(await permutationImportance(model, reordered, options)).toEqual(await permutationImportance(model, asGiven, options))
          expect(await permutationImportance(model, reordered, { ...options, reference: referenceReordered })).toEqual(
            await permutationImportance(model, asGiven, { ...options, reference: referenceAsGiven }),
          )
        },
      ),
      { numRuns: 50 },
    )
  })

  it('does not depend on the row order of the evaluation data: the same distribution over all permutations', async () => {
    // Exact, not up to Monte Carlo: each side's importance is enumerated over every distinct permuted
    // column (enumeratePermutationDraws), and RMSE does not depend on the order of the rows.
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: 2, max: 5 }).chain((rows) =>
          fc.record({
            columns: fc.array(smallColumn(rows), { minLength: 2, maxLength: 3 }),
            y: smallColumn(rows),
            order: fc.shuffledSubarray(Array.from({ length: rows }, (_, i) => i), { minLength: rows, maxLength: rows }),
          }),
        ),
        async ({ columns, y, order }) => {
          const names = columns.map((_, j) => `f${j}`)
          const model = nonlinear(names)
          const data = evaluationOf(Object.fromEntries(names.map((name, j) => [name, columns[j]])), y)
          const shuffled = selectRows(data, order)
          const metric = metricByName('rmse', 'regression')
          const a = await enumeratePermutationDraws(model, data, { metric, drawsPerCall: 200 })
          const b = await enumeratePermutationDraws(model, shuffled, { metric, drawsPerCall: 200 })
          for (const name of names) {
            const sortedA = a.get(name)!.map((d) => d.importance).sort((p, q) => p - q)
            const sortedB = b.get(name)!.map((d) => d.importance).sort((p, q) => p - q)
            expect(sortedB).toHaveLength(sortedA.length)
            sortedA.forEach((v, i) => expect(sortedB[i]).toBeCloseTo(v, 10))
          }
        },
      ),
      { numRuns: 40 },
    )
  })
})

describe('permutationImportance(model, evaluation, options): reference draws and misuse', () => {
  it('draws with replacement from a reference smaller than the evaluation rows, and sends all K draws in one call', async () => {
    const data = evaluationOf({ a: [1, 2, 3, 4, 5, 6], b: [0, 0, 0, 1, 1, 1] }, [1, 2, 3, 4, 5, 6])
    const reference = evaluationOf({ a: [100, 200], b: [7, 8] }, [0, 0])
    const rows: number[] = []
    const seenA = new Set<number>()
    const model: Model = {
      kind: 'test',
      task: 'regression',
      featureNames: ['a', 'b'],
      predict: async (matrix) => {
        rows.push(matrix.rows)
        if (rows.length === 2) for (const v of matrix.columns[0]) seenA.add(v)
        return matrix.columns[0].slice()
      },
    }
    const result = await permutationImportance(model, data, { metric: meanSquaredError, draws: 7, seed: 1, reference })
    expect(rows).toEqual([6, 42, 42])
    expect(seenA).toEqual(new Set([100, 200]))
    expect(result.importances[1].draws).toEqual([0, 0, 0, 0, 0, 0, 0])
  })

  it('refuses fewer than one draw and fewer than two evaluation rows with a RangeError naming itself', async () => {
    const model = functionModel(['a'], (row) => row.a)
    const metric = meanSquaredError
    await expect(permutationImportance(model, evaluationOf({ a: [1, 2] }, [1, 2]), { metric, draws: 0, seed: 1 })).rejects.toThrow(
      new RangeError('permutationImportance needs a whole number of draws >= 1, got 0'),
    )
    await expect(permutationImportance(model, evaluationOf({ a: [1] }, [1]), { metric, draws: 2, seed: 1 })).rejects.toThrow(
      new RangeError('permutationImportance needs at least 2 evaluation rows, got 1'),
    )
  })
})

describe('permutationImportance through the tree fast path', () => {
  it('gives the draws a full re-evaluation of every permuted matrix gives (NaN values, a group, reference rows)', async () => {
    const { binFeatures } = await import('../../../src/core/models/gbt/bin-features.ts')
    const { fitBoosted } = await import('../../../src/core/models/gbt/fit-boosted.ts')
    const random = createRandom(77)
    const make = (rows: number) => {
      const columns: Record<string, Float64Array> = {}
      for (const name of ['a', 'b', 'c', 'd']) columns[name] = Float64Array.from({ length: rows }, () => (random.next() < 0.1 ? NaN : random.normal()))
      const y = Float64Array.from({ length: rows }, (_, i) => ((columns.a[i] || 0) + (columns.b[i] || 0) * (columns.c[i] || 0) > 0 ? 1 : 0))
      return evaluationOf(columns, y)
    }
    const train = make(600)
    const model = fitBoosted(binFeatures(train), train.target.values, {
      task: 'binary',
      seed: 4,
      settings: { trees: 30, maxDepth: 4, learningRate: 0.3, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 },
    })
    // The same model without the fast path: every draw is a full prediction of the permuted matrix.
    const plain: Model = { kind: model.kind, task: model.task, featureNames: model.featureNames, predict: (m) => model.predict(m) }
    const evaluation = make(300)
    const reference = make(200)
    // Log loss: equal to rounding. AUC: the fast path's sums differ from a full evaluation's in the
    // last bits (reassociation), which can break a tie between two rows that share every leaf; one
    // broken tie moves AUC by 1 / (2 · positives · negatives), about 2e-5 here, so a few are allowed.
    for (const [metric, tolerance] of [[metricByName('log-loss', 'binary'), 1e-12], [metricByName('auc', 'binary'), 2e-4]] as const) {
      const options = { metric, draws: 4, seed: 9, reference, groups: [{ name: 'bc', members: ['b', 'c'] }] }
      const fast = await permutationImportance(model, evaluation, options)
      const full = await permutationImportance(plain, evaluation, options)
      expect(fast.score).toBe(full.score)
      expect(fast.importances.map((e) => e.name)).toEqual(['a', 'b', 'c', 'd', 'bc'])
      fast.importances.forEach((e, u) => {
        e.draws.forEach((value, k) => expect(Math.abs(value - full.importances[u].draws[k])).toBeLessThan(tolerance))
      })
    }
  })
})
