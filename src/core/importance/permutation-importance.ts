import { replacementUnits, stackedCopies } from './replacement-units.ts'
import type { FeatureMatrix } from '../data/dataset.ts'
import { selectFeatures } from '../data/dataset.ts'
import type { Metric } from '../metrics/metric.ts'
import { predictionWidth, type Model } from '../models/model.ts'
import { createRandom, deriveSeed, shuffledIndices } from '../statistics/random.ts'
import { tInterval } from '../statistics/t-interval.ts'
import { rowContributions } from './row-contributions.ts'

/** Columns permuted together: every member takes its value from the same reference row. */
export interface FeatureGroup {
  readonly name: string
  readonly members: readonly string[]
}

/** One feature's (or group's) importance from one model: loss increase per draw. */
export interface ImportanceEstimate {
  readonly name: string
  readonly members: readonly string[]
  readonly isGroup: boolean
  /** Importance of each draw: how much worse the metric got (positive = the model relies on it). */
  readonly draws: readonly number[]
  readonly mean: number
  /** SD of the draws, ddof 1 (NaN for one draw). */
  readonly sd: number
  /** 95% t-interval of the mean over draws (NaN bounds for one draw). */
  readonly lower: number
  readonly upper: number
  /**
   * Standard error of `mean` from the finite holdout: SD over rows of each row's contribution
   * (averaged over the draws) / √n; NaN for metrics that are not means over rows (AUC).
   */
  readonly rowSe?: number
}

export interface PermutationImportanceResult {
  /** The metric on the untouched evaluation rows. */
  readonly score: number
  readonly importances: readonly ImportanceEstimate[]
}

export interface PermutationImportanceOptions {
  readonly metric: Metric
  /** K: draws per feature; all K go to the model in one batched call. */
  readonly draws: number
  /** Seed for the draws. Each feature's draws derive from (seed, feature name), so the same feature
   * gets the same reference rows on both sides of a comparison (common random numbers). */
  readonly seed: number
  /** Where replacement values come from (default: the evaluation rows themselves, i.e. classic
   * permutation). Must have every feature the model uses. */
  readonly reference?: FeatureMatrix
  readonly groups?: readonly FeatureGroup[]
}

/**
 * Permutation feature importance with draws from reference data (Breiman 2001, "Random Forests",
 * Machine Learning 45; the model-reliance view of Fisher, Rudin & Dominici 2019, JMLR 20(177)).
 *
 * For each feature the model uses, and each group whose members it uses, the evaluation rows' values
 * of that feature (or all group members jointly) are replaced by values from reference rows, K times;
 * every other column and the label stay as they are; the metric is recomputed. Importance of a draw
 * is the metric's worsening (a drop for higher-is-better metrics, a rise for losses). Negative values
 * are reported as they are: the model did better without the feature on those rows.
 *
 * Reference rows per draw: when `reference` is omitted, a uniform random permutation of the
 * evaluation rows (the classic scheme, an exact permutation of the column); otherwise the first n of
 * a random permutation of the reference rows when it has at least n rows, else draws with
 * replacement. A constant model gets exactly zero for every feature.
 *
 * A multiclass model's predictions are [n, C] class probabilities, scored by a multiclass metric.
 * Cost: one model call of K·n rows per unit, on one stacked buffer of K·n·F values allocated once;
 * a model with a batched fast path (tree ensembles) gets every unit's draws in one call instead.
 */
export async function permutationImportance(
  model: Model,
  evaluation: FeatureMatrix & { readonly target: { readonly values: Float64Array } },
  options: PermutationImportanceOptions,
): Promise<PermutationImportanceResult> {
  const { metric, draws } = options
  if (!Number.isInteger(draws) || draws < 1) {
    throw new RangeError(`permutationImportance needs a whole number of draws >= 1, got ${draws}`)
  }
  const names = model.featureNames
  const data = selectFeatures(evaluation, names)
  const reference = options.reference ? selectFeatures(options.reference, names) : data
  const usesOwnRows = options.reference === undefined
  const n = data.rows
  // Values per row of a prediction: K class probabilities for a multiclass model, else 1.
  const width = predictionWidth(model)
  const y = evaluation.target.values
  if (n < 2) throw new RangeError(`permutationImportance needs at least 2 evaluation rows, got ${n}`)
  if (reference.rows < 1) throw new RangeError('permutationImportance needs at least 1 reference row')

  const basePrediction = await model.predict(data)
  const score = metric.compute(y, basePrediction)
  const contribution = new Float64Array(n)
  const rowSum = new Float64Array(n)

  const units = replacementUnits(names, options.groups)

  // Models with a fast path re-evaluate only what a replacement can change; others get one stacked
  // buffer of K copies of the evaluation rows (column-major, allocated once) per call.
  const fast = model.createReplacementPredictor?.(data)
  const stackedMatrix = stackedCopies(data, draws, Boolean(fast))
  const stackedRows = stackedMatrix.rows
  const stacked = stackedMatrix.columns
  const importances: ImportanceEstimate[] = []

  /** The unit's K draws of replacement values, stacked (copy k at offset k·n), into `into` or new arrays. */
  const drawReplacement = (unit: (typeof units)[number], into?: readonly Float64Array[]) => {
    const random = createRandom(deriveSeed(options.seed, 'draws', unit.isGroup ? 'group' : 'feature', unit.name))
    const replaced = new Map<string, Float64Array>()
    unit.columns.forEach((j, m) => replaced.set(names[j], into ? into[m] : new Float64Array(stackedRows)))
    for (let k = 0; k < draws; k++) {
      const rows = referenceRows(n, reference.rows, usesOwnRows, random)
      for (const j of unit.columns) {
        const source = reference.columns[j]
        const target = replaced.get(names[j])!
        const offset = k * n
        for (let i = 0; i < n; i++) target[offset + i] = source[rows[i]]
      }
    }
    return replaced
  }
  // A fast path that takes every unit at once walks each tree once per block of rows for all of them.
  const batched = fast?.predictMany ? fast.predictMany(units.map((unit) => drawReplacement(unit)), draws) : undefined

  for (const [u, unit] of units.entries()) {
    let prediction: Float64Array
    if (batched) prediction = batched[u]
    else if (fast) prediction = fast.predict(drawReplacement(unit), draws)
    else {
      drawReplacement(unit, unit.columns.map((j) => stacked[j]))
      prediction = await model.predict(stackedMatrix)
    }
    const values: number[] = []
    rowSum.fill(0)
    let decomposes = true
    for (let k = 0; k < draws; k++) {
      const block = prediction.subarray(k * n * width, (k + 1) * n * width)
      const permuted = metric.compute(y, block)
      values.push(metric.higherIsBetter ? score - permuted : permuted - score)
      if (decomposes && rowContributions(metric, y, basePrediction, block, contribution)) {
        for (let i = 0; i < n; i++) rowSum[i] += contribution[i]
      } else decomposes = false
    }
    const rowSe = decomposes ? standardErrorOfMean(rowSum, draws) : NaN
    if (!fast) {
      for (const j of unit.columns) {
        const column = data.columns[j]
        for (let k = 0; k < draws; k++) stacked[j].set(column, k * n)
      }
    }
    const interval = summarizeDraws(values)
    importances.push({ name: unit.name, members: unit.members, isGroup: unit.isGroup, draws: values, ...interval, rowSe })
  }
  return { score, importances }
}

function referenceRows(n: number, available: number, usesOwnRows: boolean, random: ReturnType<typeof createRandom>) {
  if (usesOwnRows || available >= n) return shuffledIndices(available, random).subarray(0, n)
  const rows = new Uint32Array(n)
  for (let i = 0; i < n; i++) rows[i] = random.int(available)
  return rows
}

/** SD over rows of the per-row means (sums / draws), divided by √n. */
function standardErrorOfMean(sums: Float64Array, draws: number): number {
  const n = sums.length
  let mean = 0
  for (let i = 0; i < n; i++) mean += sums[i] / draws
  mean /= n
  let squares = 0
  for (let i = 0; i < n; i++) squares += (sums[i] / draws - mean) ** 2
  return Math.sqrt(squares / (n - 1) / n)
}

function summarizeDraws(values: readonly number[]): { mean: number; sd: number; lower: number; upper: number } {
  if (values.length === 1) return { mean: values[0], sd: NaN, lower: NaN, upper: NaN }
  const t = tInterval(values)
  return { mean: t.mean, sd: t.sd, lower: t.lower, upper: t.upper }
}
