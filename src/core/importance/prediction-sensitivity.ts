import { replacementUnits, stackedCopies } from './replacement-units.ts'
import type { FeatureMatrix } from '../data/dataset.ts'
import { selectFeatures } from '../data/dataset.ts'
import { argmaxRow } from '../metrics/multiclass-accuracy.ts'
import { predictionWidth, type Model } from '../models/model.ts'
import { createRandom, deriveSeed, shuffledIndices } from '../statistics/random.ts'
import type { FeatureGroup } from './permutation-importance.ts'

/** One feature's (or group's) prediction sensitivity from one model on one set of rows. */
export interface SensitivityEstimate {
  readonly name: string
  readonly members: readonly string[]
  readonly isGroup: boolean
  /**
   * Per draw: the mean over rows of |f(x with the feature replaced) − f(x)|. Multiclass: of half the
   * sum over classes of the probabilities' absolute changes (the total variation distance between
   * the two class distributions, in [0, 1]; for two classes it is the binary |Δp|).
   */
  readonly draws: readonly number[]
  /** Mean of `draws`. For a classifier, in probability. */
  readonly mean: number
  /** Classifiers only (a threshold given, or multiclass): per draw, the share of rows whose decision flips. */
  readonly flipDraws?: readonly number[]
  /** Mean of `flipDraws`. */
  readonly flipShare?: number
}

export interface PredictionSensitivityOptions {
  /** K: draws per feature; all K go to the model in one batched call. */
  readonly draws: number
  /** Each feature's draws derive from (seed, feature name), so both sides draw the same reference rows. */
  readonly seed: number
  /** Where replacement values come from. Must have every feature the model uses. */
  readonly reference: FeatureMatrix
  /** Classifiers: the decision threshold on the positive-class probability (a row is positive at or above it). */
  readonly threshold?: number
  /** Multiclass: count flips of the most probable class (argmax, ties to the lowest class). */
  readonly argmax?: boolean
  readonly groups?: readonly FeatureGroup[]
}

/**
 * Prediction sensitivity: how much the model's output moves when one input is replaced by a value
 * drawn from reference rows, with every other input of the row kept. It is the unary quantitative
 * input influence of Datta, Sen & Zick (2016, "Algorithmic transparency via quantitative input
 * influence", IEEE S&P), with the mean absolute change of the output as the quantity of interest,
 * and for a classifier also the share of rows whose decision changes (their influence on the
 * classification outcome). It needs no labels, so it can be measured on rows whose outcome is not
 * known yet (a recent sample of production inputs) as well as on the holdout.
 *
 * For each feature the model uses, and each group whose members it uses (members replaced jointly
 * from one reference row), K draws: each draw takes the first n of a random permutation of the
 * reference rows when there are at least n of them, else n draws with replacement. Draws derive
 * from (seed, unit name). A feature the model ignores gets exactly 0.
 *
 * Cost: one model call of K·n rows per unit (or the model's replacement fast path).
 */
export async function predictionSensitivity(
  model: Model,
  rows: FeatureMatrix,
  options: PredictionSensitivityOptions,
): Promise<SensitivityEstimate[]> {
  const { draws, threshold } = options
  const argmax = options.argmax === true
  if (!Number.isInteger(draws) || draws < 1) {
    throw new RangeError(`predictionSensitivity needs a whole number of draws >= 1, got ${draws}`)
  }
  const names = model.featureNames
  const data = selectFeatures(rows, names)
  const reference = selectFeatures(options.reference, names)
  const n = data.rows
  if (n < 1) throw new RangeError('predictionSensitivity needs at least 1 row')
  if (reference.rows < 1) throw new RangeError('predictionSensitivity needs at least 1 reference row')
  const original = await model.predict(data)
  const width = predictionWidth(model)
  const countsFlips = threshold !== undefined || argmax

  const units = replacementUnits(names, options.groups)
  const fast = model.createReplacementPredictor?.(data)
  const stackedMatrix = stackedCopies(data, draws, Boolean(fast))
  const stackedRows = stackedMatrix.rows
  const stacked = stackedMatrix.columns

  const estimates: SensitivityEstimate[] = []
  for (const unit of units) {
    const random = createRandom(deriveSeed(options.seed, 'sensitivity', unit.isGroup ? 'group' : 'feature', unit.name))
    const replaced = new Map<string, Float64Array>()
    for (const j of unit.columns) replaced.set(names[j], fast ? new Float64Array(stackedRows) : stacked[j])
    for (let k = 0; k < draws; k++) {
      const picked = reference.rows >= n ? shuffledIndices(reference.rows, random).subarray(0, n) : drawWithReplacement(n, reference.rows, random)
      for (const j of unit.columns) {
        const source = reference.columns[j]
        const target = replaced.get(names[j])!
        for (let i = 0; i < n; i++) target[k * n + i] = source[picked[i]]
      }
    }
    const prediction = fast ? fast.predict(replaced, draws) : await model.predict(stackedMatrix)
    const changes: number[] = []
    const flipShares: number[] = []
    for (let k = 0; k < draws; k++) {
      let change = 0
      let flipped = 0
      if (width > 1) {
        for (let i = 0; i < n; i++) {
          const at = (k * n + i) * width
          let total = 0
          for (let c = 0; c < width; c++) total += Math.abs(prediction[at + c] - original[i * width + c])
          change += total / 2
          if (argmax && argmaxRow(original, i * width, width) !== argmaxRow(prediction, at, width)) flipped++
        }
      } else {
        for (let i = 0; i < n; i++) {
          const before = original[i]
          const after = prediction[k * n + i]
          change += Math.abs(after - before)
          if (threshold !== undefined && before >= threshold !== after >= threshold) flipped++
        }
      }
      changes.push(change / n)
      flipShares.push(flipped / n)
    }
    if (!fast) {
      for (const j of unit.columns) for (let k = 0; k < draws; k++) stacked[j].set(data.columns[j], k * n)
    }
    estimates.push({
      name: unit.name,
      members: unit.members,
      isGroup: unit.isGroup,
      draws: changes,
      mean: average(changes),
      ...(countsFlips ? { flipDraws: flipShares, flipShare: average(flipShares) } : {}),
    })
  }
  return estimates
}

function drawWithReplacement(n: number, available: number, random: ReturnType<typeof createRandom>): Uint32Array {
  const rows = new Uint32Array(n)
  for (let i = 0; i < n; i++) rows[i] = random.int(available)
  return rows
}

function average(values: readonly number[]): number {
  let s = 0
  for (const v of values) s += v
  return s / values.length
}
