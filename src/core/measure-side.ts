import type { Dataset, FeatureMatrix, Task } from './data/dataset.ts'
import { selectFeatures, selectRows } from './data/dataset.ts'
import { computeNoiseFloor, type FlooredImportance } from './importance/compute-noise-floor.ts'
import { permutationImportance, type FeatureGroup, type ImportanceEstimate } from './importance/permutation-importance.ts'
import type { Metric } from './metrics/metric.ts'
import { rocAuc } from './metrics/roc-auc.ts'
import { rSquared } from './metrics/r-squared.ts'
import type { Fit, Model, ModelEngine } from './models/model.ts'
import { createRandom, deriveSeed, shuffledIndices } from './statistics/random.ts'

export interface MeasureSideInputs {
  readonly side: 'base' | 'head'
  readonly train: Dataset
  readonly holdout: Dataset
  /** Rows permutation draws come from (default: the training rows). */
  readonly reference: FeatureMatrix
  /** Refits the model; or, for a loaded model, `model` is given and there is one "refit". */
  readonly fit?: Fit
  readonly model?: Model
}

export interface MeasureSideOptions {
  readonly task: Task
  readonly metric: Metric
  readonly seed: number
  readonly refits: number
  readonly draws: number
  readonly groups: readonly FeatureGroup[]
  /** Cap on holdout rows used for importance (the score always uses every holdout row). */
  readonly evaluationRows: number
  /** Cap on reference rows permutation draws come from. */
  readonly referenceRows: number
  readonly onRefit?: (refit: number, of: number) => void
  /** Ask the fit for every refit at once (training commands, which run up to their own parallel limit). */
  readonly concurrentFits?: boolean
}

export interface SideMeasurement {
  readonly refitSeeds: readonly number[]
  readonly scores: readonly number[]
  readonly separation: readonly number[]
  readonly importances: readonly FlooredImportance[]
  readonly perRefit: readonly (readonly ImportanceEstimate[])[]
  readonly evaluationRows: number
  readonly referenceRows: number
  /** engine: what computed the predictions (Model.engine; 'onnxruntime' when a model does not say). */
  readonly model: { readonly kind: string; readonly featureNames: readonly string[]; readonly engine: ModelEngine }
  /** Holdout predictions of the first refit, for a paired bootstrap when there is one refit. */
  readonly firstPredictions: Float64Array
  readonly noiseCovers: 'refits-and-draws' | 'draws-only'
}

/** The seed of refit r. The same on both sides, so a change that alters nothing alters no number. */
export function refitSeed(seed: number, refit: number): number {
  return deriveSeed(seed, 'refit', refit)
}

/** The rows one side's importances are measured on: the capped holdout and the capped reference rows. */
export interface SideRows {
  readonly evaluation: Dataset & { readonly target: { readonly values: Float64Array } }
  readonly reference: FeatureMatrix
}

/** What one refit contributes to a side's measurement (see measureRefit). */
export interface RefitMeasurement {
  readonly score: number
  readonly separation: number
  /** In the side's canonical order (features, then groups), zeros for features the model does not use. */
  readonly importances: readonly ImportanceEstimate[]
  /** Holdout predictions (the first refit's feed a paired bootstrap). */
  readonly predictions: Float64Array
  readonly model: SideMeasurement['model']
}

/**
 * The capped holdout and reference rows of a side. The samples depend only on the seed and row
 * counts, so both sides use the same rows when their holdouts match, and any thread that calls
 * this with the same inputs gets the same rows.
 */
export function sideRows(inputs: Pick<MeasureSideInputs, 'holdout' | 'reference'>, options: Pick<MeasureSideOptions, 'seed' | 'evaluationRows' | 'referenceRows'>): SideRows {
  if (!inputs.holdout.target) throw new RangeError('measureSide needs a holdout with a target')
  return {
    evaluation: capRows(inputs.holdout, options.evaluationRows, deriveSeed(options.seed, 'evaluation-rows')) as SideRows['evaluation'],
    reference: capRows(inputs.reference, options.referenceRows, deriveSeed(options.seed, 'reference-rows')),
  }
}

/** The seeds of a side's refits (one for a loaded model). */
export function sideRefitSeeds(inputs: Pick<MeasureSideInputs, 'model'>, options: Pick<MeasureSideOptions, 'seed' | 'refits'>): number[] {
  const refits = inputs.model ? 1 : options.refits
  return Array.from({ length: refits }, (_, r) => refitSeed(options.seed, r))
}

/**
 * Refit r's part of a side's measurement, given its model: the score and separation on the whole
 * holdout, and permutation importance on the side's rows with draws seeded by (seed, r). Pure in its
 * inputs, so a worker thread computing it gives the same numbers as this thread.
 */
export async function measureRefit(
  model: Model,
  inputs: Pick<MeasureSideInputs, 'holdout' | 'train'>,
  options: MeasureSideOptions,
  rows: SideRows,
  refit: number,
): Promise<RefitMeasurement> {
  const { holdout, train } = inputs
  const target = holdout.target
  if (!target) throw new RangeError('measureSide needs a holdout with a target')
  const predictions = await model.predict(selectFeatures(holdout, model.featureNames))
  const score = options.metric.compute(target.values, predictions)
  const separation = options.task === 'binary' ? rocAuc(target.values, predictions) : rSquared(target.values, predictions)
  const result = await permutationImportance(model, rows.evaluation, {
    metric: options.metric,
    draws: options.draws,
    seed: deriveSeed(options.seed, 'draws', refit),
    reference: rows.reference,
    groups: options.groups,
  })
  const featureOrder = train.features.map((f) => f.name)
  return {
    score,
    separation,
    importances: canonicalOrder(result.importances, featureOrder, options.groups, options.draws),
    predictions,
    model: { kind: model.kind, featureNames: model.featureNames, engine: model.engine ?? 'onnxruntime' },
  }
}

/** A side's measurement from its refits' parts, in refit order. */
export function combineRefits(seeds: readonly number[], rows: SideRows, refits: readonly RefitMeasurement[]): SideMeasurement {
  if (refits.length === 0 || refits.length !== seeds.length) throw new RangeError('combineRefits needs one part per refit seed')
  const perRefit = refits.map((r) => [...r.importances])
  return {
    refitSeeds: [...seeds],
    scores: refits.map((r) => r.score),
    separation: refits.map((r) => r.separation),
    importances: computeNoiseFloor(perRefit),
    perRefit,
    evaluationRows: rows.evaluation.rows,
    referenceRows: rows.reference.rows,
    model: refits[refits.length - 1].model,
    firstPredictions: refits[0].predictions,
    noiseCovers: refits.length < 2 ? 'draws-only' : 'refits-and-draws',
  }
}

/**
 * One side's refits: for each of R refits (seeds derived from the policy seed), fit, score on the
 * whole holdout, and measure permutation importance on the (capped) holdout with K draws from the
 * (capped) reference rows; then the noise floor over refits. The capped row samples depend only on
 * the seed and row counts, so both sides use the same rows when their holdouts match.
 * (sideRows, measureRefit and combineRefits are its parts, for a pool of worker threads.)
 */
export async function measureSide(inputs: MeasureSideInputs, options: MeasureSideOptions): Promise<SideMeasurement> {
  const rows = sideRows(inputs, options)
  const refitSeeds = sideRefitSeeds(inputs, options)
  const refits = refitSeeds.length
  const fitRefit = (r: number) => inputs.fit!({ side: inputs.side, seed: refitSeeds[r], refit: r, leaveOut: [] })
  // A fit that waits on something else (a training command) is asked for every refit at once, so that
  // its own limit on parallel runs decides; a built-in fit computes in this thread, one at a time.
  const prefetched = !inputs.model && options.concurrentFits ? refitSeeds.map((_, r) => fitRefit(r)) : undefined
  prefetched?.forEach((p) => p.catch(() => undefined)) // awaited below in order; a failure surfaces there
  const parts: RefitMeasurement[] = []
  for (let r = 0; r < refits; r++) {
    options.onRefit?.(r, refits)
    const model = inputs.model ?? (await (prefetched ? prefetched[r] : fitRefit(r)))
    parts.push(await measureRefit(model, inputs, options, rows, r))
  }
  return combineRefits(refitSeeds, rows, parts)
}

/**
 * Estimates in the side's feature order then group order. A feature the model does not use (left
 * out, or ignored by a loaded model) gets exact zeros: permuting it cannot change a prediction.
 */
function canonicalOrder(
  estimates: readonly ImportanceEstimate[],
  featureOrder: readonly string[],
  groups: readonly FeatureGroup[],
  draws: number,
): ImportanceEstimate[] {
  const byKey = new Map(estimates.map((e) => [`${e.isGroup ? 'g' : 'f'}:${e.name}`, e]))
  const zero = (name: string, members: readonly string[], isGroup: boolean): ImportanceEstimate => ({
    name,
    members,
    isGroup,
    draws: new Array(draws).fill(0),
    mean: 0,
    sd: draws > 1 ? 0 : NaN,
    lower: draws > 1 ? 0 : NaN,
    upper: draws > 1 ? 0 : NaN,
    rowSe: 0,
  })
  const present = new Set(featureOrder)
  return [
    ...featureOrder.map((name) => byKey.get(`f:${name}`) ?? zero(name, [name], false)),
    ...groups
      .filter((g) => g.members.every((m) => present.has(m)))
      .map((g) => byKey.get(`g:${g.name}`) ?? zero(g.name, g.members, true)),
  ]
}

function capRows<T extends FeatureMatrix>(data: T, cap: number, seed: number): T {
  if (data.rows <= cap) return data
  const picked = shuffledIndices(data.rows, createRandom(seed)).slice(0, cap).sort()
  return selectRows(data as T & Partial<Dataset>, picked)
}
