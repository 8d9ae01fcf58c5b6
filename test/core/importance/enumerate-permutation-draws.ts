import type { FeatureMatrix } from '../../../src/core/data/dataset.ts'
import { selectFeatures } from '../../../src/core/data/dataset.ts'
import type { Metric, MetricName } from '../../../src/core/metrics/metric.ts'
import type { Model } from '../../../src/core/models/model.ts'
import { permutationImportance, type FeatureGroup } from '../../../src/core/importance/permutation-importance.ts'

/**
 * Mean squared error, for the derived, enumerated ΔMSE values of the permutation tests. The Metric type names only the
 * policy's metrics; permutationImportance never reads `name`, so the label is cast.
 */
export const meanSquaredError: Metric = {
  name: 'mse' as MetricName,
  task: 'regression',
  higherIsBetter: false,
  compute(y, prediction) {
    let sum = 0
    for (let i = 0; i < y.length; i++) sum += (y[i] - prediction[i]) ** 2
    return sum / y.length
  },
}

/** One distinct permuted column (or group of columns) and the importance permutationImportance gave it. */
export interface EnumeratedDraw {
  /** The unit's permuted columns as the model saw them, in the unit's member order. */
  readonly columns: readonly Float64Array[]
  readonly importance: number
}

/**
 * Every distinct value of a permutation statistic, from permutationImportance itself: the function
 * draws random permutations, so this calls it with seed 1, 2, ... until every distinct permuted
 * column of every unit has been seen, and returns per unit name the distinct draws.
 *
 * How a draw is identified: a recording model passes every call through to `model` and keeps a copy
 * of the matrix. permutationImportance makes one call for the untouched score, then one per unit
 * (features in the model's order, then groups) with K stacked copies of the rows; rows k·n to
 * (k+1)·n − 1 of that call are draw k. Its k-th importance belongs to that block.
 *
 * When it is complete: the n rows' value tuples (one value per member) have multiplicities t_1, t_2,
 * ...; a uniform permutation of the rows gives n! / (t_1! t_2! ...) distinct sequences, each equally
 * often, so the plain mean and variance over the distinct sequences are the exact mean and variance
 * over all n! permutations. `reference` may be given only as a row reordering of the evaluation rows
 * (then "the first n of a random permutation of the reference rows" is again a full permutation).
 * A sequence seen twice must get the same importance (the function is deterministic given its input).
 */
export async function enumeratePermutationDraws(
  model: Model,
  evaluation: FeatureMatrix & { readonly target: { readonly values: Float64Array } },
  options: { readonly metric: Metric; readonly reference?: FeatureMatrix; readonly groups?: readonly FeatureGroup[]; readonly drawsPerCall?: number; readonly maxCalls?: number },
): Promise<Map<string, EnumeratedDraw[]>> {
  const drawsPerCall = options.drawsPerCall ?? 500
  const maxCalls = options.maxCalls ?? 200
  const names = model.featureNames
  const data = selectFeatures(evaluation, names)
  const n = data.rows
  const calls: FeatureMatrix[] = []
  const recording: Model = {
    kind: model.kind,
    task: model.task,
    featureNames: names,
    predict: async (matrix) => {
      calls.push({ rows: matrix.rows, features: matrix.features, columns: matrix.columns.map((c) => c.slice()) })
      return model.predict(matrix)
    },
  }
  const units = [
    ...names.map((name) => ({ name, members: [name] })),
    ...(options.groups ?? []).filter((g) => g.members.every((m) => names.includes(m))),
  ]
  const seen = new Map(units.map((u) => [u.name, new Map<string, EnumeratedDraw>()]))
  const wanted = new Map(units.map((u) => [u.name, distinctSequences(u.members.map((m) => data.columns[names.indexOf(m)]))]))
  const complete = () => units.every((u) => seen.get(u.name)!.size === wanted.get(u.name)!)

  for (let seed = 1; seed <= maxCalls && !complete(); seed++) {
    calls.length = 0
    const result = await permutationImportance(recording, evaluation, {
      metric: options.metric,
      draws: drawsPerCall,
      seed,
      reference: options.reference,
      groups: options.groups,
    })
    units.forEach((unit, u) => {
      const estimate = result.importances[u]
      if (estimate.name !== unit.name) throw new Error(`unit ${u} is ${estimate.name}, expected ${unit.name}`)
      const call = calls[1 + u]
      const positions = unit.members.map((m) => names.indexOf(m))
      for (let k = 0; k < drawsPerCall; k++) {
        const columns = positions.map((j) => call.columns[j].slice(k * n, (k + 1) * n))
        const key = columns.map((c) => Array.from(c).join(',')).join(';')
        const known = seen.get(unit.name)!.get(key)
        if (known && known.importance !== estimate.draws[k]) {
          throw new Error(`${unit.name}: the same permuted column scored ${known.importance} and ${estimate.draws[k]}`)
        }
        if (!known) seen.get(unit.name)!.set(key, { columns, importance: estimate.draws[k] })
      }
    })
  }
  if (!complete()) {
    const coverage = units.map((u) => `${u.name} ${seen.get(u.name)!.size}/${wanted.get(u.name)}`).join(', ')
    throw new Error(`enumeratePermutationDraws: not every permutation drawn after ${maxCalls} calls (${coverage})`)
  }
  return new Map(units.map((u) => [u.name, [...seen.get(u.name)!.values()]]))
}

/** n! / (t_1! t_2! ...) for the multiplicities t of the rows' value tuples. */
function distinctSequences(columns: readonly Float64Array[]): number {
  const n = columns[0].length
  const counts = new Map<string, number>()
  for (let i = 0; i < n; i++) {
    const key = columns.map((c) => c[i]).join(',')
    counts.set(key, (counts.get(key) ?? 0) + 1)
  }
  let result = factorial(n)
  for (const t of counts.values()) result /= factorial(t)
  return Math.round(result)
}

function factorial(n: number): number {
  let f = 1
  for (let i = 2; i <= n; i++) f *= i
  return f
}

/** Mean and variance (divisor = count: the distribution's own variance) of a list of values. */
export function meanAndVariance(values: readonly number[]): { mean: number; variance: number } {
  const mean = values.reduce((s, v) => s + v, 0) / values.length
  const variance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / values.length
  return { mean, variance }
}
