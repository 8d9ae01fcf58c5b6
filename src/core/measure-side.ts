import type { Dataset, FeatureMatrix, Task } from './data/dataset.ts'
import { selectFeatures, selectRows } from './data/dataset.ts'
import { computeNoiseFloor, type FlooredImportance } from './importance/compute-noise-floor.ts'
import { permutationImportance, type FeatureGroup, type ImportanceEstimate } from './importance/permutation-importance.ts'
import { predictionSensitivity, type SensitivityEstimate } from './importance/prediction-sensitivity.ts'
import type { Metric } from './metrics/metric.ts'
import { macroOvrAuc } from './metrics/macro-ovr-auc.ts'
import { rocAuc } from './metrics/roc-auc.ts'
import { rSquared } from './metrics/r-squared.ts'
import { predictionWidth, type Fit, type Model, type ModelEngine } from './models/model.ts'
import { predictionRows } from './models/prediction-rows.ts'
import { createRandom, deriveSeed, shuffledIndices } from './statistics/random.ts'
import { measureDropColumns, type DropColumnRequest, type DropColumnScores } from './measure-drop-columns.ts'
import { rankByValue } from './statistics/rank-by-value.ts'

export interface MeasureSideInputs {
  readonly side: 'base' | 'head'
  readonly train: Dataset
  readonly holdout: Dataset
  /** Rows permutation draws come from (default: the training rows). */
  readonly reference: FeatureMatrix
  /** Refits the model; or, for a loaded model, `model` is given and there is one "refit". */
  readonly fit?: Fit
  readonly model?: Model
  /** Rows without labels, for prediction sensitivity (capped like the holdout). */
  readonly unlabeled?: FeatureMatrix
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
  /** Measure prediction sensitivity in every refit (on the capped holdout, and on `unlabeled`). */
  readonly sensitivity?: { readonly threshold?: number; readonly argmax?: boolean }
  /** Policy slices of the holdout (row indices) to score and measure importance on, in every refit. */
  readonly slices?: readonly { readonly name: string; readonly rows: Uint32Array }[]
  /** Drop-column (LOCO) refits after the full ones, with the same seeds; none for a loaded model. */
  readonly dropColumns?: DropColumnRequest
}

/** One policy slice on one side: per-refit scores on its rows, and importance measured on them. */
export interface SliceMeasurement {
  readonly name: string
  readonly rows: number
  readonly scores: readonly number[]
  readonly importances: readonly FlooredImportance[]
}

/** Per refit, in refit order: each unit's prediction sensitivity (feature order, then groups). */
export interface SideSensitivity {
  readonly holdout: readonly (readonly SensitivityEstimate[])[]
  readonly unlabeled?: readonly (readonly SensitivityEstimate[])[]
  readonly unlabeledRows: number
}

/** Gain and split count of one feature in one refit's model (in-sample). */
export interface SplitStatistic {
  readonly feature: string
  readonly gain: number
  readonly splits: number
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
  readonly sensitivity?: SideSensitivity
  /** Built-in gradient boosting only: gain and split count per feature, per refit (in-sample). */
  readonly splitStatistics?: readonly (readonly SplitStatistic[])[]
  readonly slices?: readonly SliceMeasurement[]
  /** Holdout scores of the drop-column refits, per feature, then per group (empty for a loaded model or when not asked). */
  readonly dropColumns: readonly DropColumnScores[]
}

/** The seed of refit r. The same on both sides, so a change that alters nothing alters no number. */
export function refitSeed(seed: number, refit: number): number {
  return deriveSeed(seed, 'refit', refit)
}

type Labelled = Dataset & { readonly target: { readonly values: Float64Array } }

/**
 * The rows one side's importances are measured on: the capped holdout and reference rows, the capped
 * unlabeled rows (when sensitivity is measured), and each policy slice of the holdout.
 */
export interface SideRows {
  readonly evaluation: Labelled
  readonly reference: FeatureMatrix
  readonly unlabeled?: FeatureMatrix
  readonly slices: readonly { readonly name: string; readonly rows: Uint32Array; readonly data: Labelled }[]
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
  /** Per policy slice (in options.slices order): the score on its rows and importance measured on them. */
  readonly slices: readonly { readonly score: number; readonly importances: readonly ImportanceEstimate[] }[]
  readonly splitStatistics?: readonly SplitStatistic[]
  readonly sensitivity?: { readonly holdout: readonly SensitivityEstimate[]; readonly unlabeled?: readonly SensitivityEstimate[] }
}

/**
 * The capped holdout and reference rows of a side. The samples depend only on the seed and row
 * counts, so both sides use the same rows when their holdouts match, and any thread that calls
 * this with the same inputs gets the same rows.
 */
export function sideRows(
  inputs: Pick<MeasureSideInputs, 'holdout' | 'reference' | 'unlabeled'>,
  options: Pick<MeasureSideOptions, 'seed' | 'evaluationRows' | 'referenceRows' | 'sensitivity' | 'slices'>,
): SideRows {
  if (!inputs.holdout.target) throw new RangeError('measureSide needs a holdout with a target')
  const unlabeled =
    inputs.unlabeled && options.sensitivity ? capRows(inputs.unlabeled, options.evaluationRows, deriveSeed(options.seed, 'unlabeled-rows')) : undefined
  return {
    evaluation: capRows(inputs.holdout, options.evaluationRows, deriveSeed(options.seed, 'evaluation-rows')) as Labelled,
    reference: capRows(inputs.reference, options.referenceRows, deriveSeed(options.seed, 'reference-rows')),
    ...(unlabeled ? { unlabeled } : {}),
    slices: (options.slices ?? []).map((slice) => ({ ...slice, data: selectRows(inputs.holdout, slice.rows) as Labelled })),
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
  const separation =
    options.task === 'binary'
      ? rocAuc(target.values, predictions)
      : options.task === 'multiclass'
        ? macroOvrAuc(target.values, predictions)
        : rSquared(target.values, predictions)
  const result = await permutationImportance(model, rows.evaluation, {
    metric: options.metric,
    draws: options.draws,
    seed: deriveSeed(options.seed, 'draws', refit),
    reference: rows.reference,
    groups: options.groups,
  })
  const featureOrder = train.features.map((f) => f.name)
  const slices: RefitMeasurement['slices'][number][] = []
  for (const slice of rows.slices) {
    const slicePrediction = predictionRows(predictions, slice.rows, predictionWidth(model))
    const sliced = await permutationImportance(model, slice.data, {
      metric: options.metric,
      draws: options.draws,
      seed: deriveSeed(options.seed, 'slice-draws', slice.name, refit),
      reference: rows.reference,
      groups: options.groups,
    })
    slices.push({
      score: options.metric.compute(slice.data.target.values, slicePrediction),
      importances: canonicalOrder(sliced.importances, featureOrder, options.groups, options.draws),
    })
  }
  let sensitivity: RefitMeasurement['sensitivity']
  if (options.sensitivity) {
    // The same draw seed on both sides and in every refit: common random numbers, as for importance.
    const { threshold, argmax } = options.sensitivity
    const settings = { draws: options.draws, seed: deriveSeed(options.seed, 'sensitivity'), reference: rows.reference, groups: options.groups, threshold, argmax }
    const countsFlips = threshold !== undefined || argmax === true
    const order = (units: SensitivityEstimate[]) => canonicalSensitivity(units, featureOrder, options.groups, options.draws, countsFlips)
    sensitivity = {
      holdout: order(await predictionSensitivity(model, rows.evaluation, settings)),
      ...(rows.unlabeled ? { unlabeled: order(await predictionSensitivity(model, rows.unlabeled, settings)) } : {}),
    }
  }
  return {
    score,
    separation,
    importances: canonicalOrder(result.importances, featureOrder, options.groups, options.draws),
    predictions,
    model: { kind: model.kind, featureNames: model.featureNames, engine: model.engine ?? 'onnxruntime' },
    slices,
    ...(model.splitStatistics ? { splitStatistics: model.splitStatistics.map((x) => ({ feature: x.feature, gain: x.gain, splits: x.splits })) } : {}),
    ...(sensitivity ? { sensitivity } : {}),
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
    // Drop-column refits come after the full ones (their candidates depend on the full importances).
    dropColumns: [],
    ...(refits.every((r) => r.sensitivity)
      ? {
          sensitivity: {
            holdout: refits.map((r) => r.sensitivity!.holdout),
            ...(rows.unlabeled ? { unlabeled: refits.map((r) => r.sensitivity!.unlabeled ?? []) } : {}),
            unlabeledRows: rows.unlabeled?.rows ?? 0,
          },
        }
      : {}),
    ...(refits.every((r) => r.splitStatistics) ? { splitStatistics: refits.map((r) => r.splitStatistics!) } : {}),
    ...(rows.slices.length > 0
      ? {
          slices: rows.slices.map((slice, k) => ({
            name: slice.name,
            rows: slice.rows.length,
            scores: refits.map((r) => r.slices[k].score),
            importances: computeNoiseFloor(refits.map((r) => [...r.slices[k].importances])),
          })),
        }
      : {}),
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
  const combined = combineRefits(refitSeeds, rows, parts)
  const dropColumns =
    inputs.fit && options.dropColumns && refits >= 2
      ? await measureDropColumns(
          { side: inputs.side, train: inputs.train, holdout: inputs.holdout, fit: inputs.fit },
          {
            request: options.dropColumns,
            ranked: rankedFeatureNames(combined),
            groups: options.groups,
            importances: combined.importances,
            refitSeeds,
            metric: options.metric,
            concurrentFits: options.concurrentFits,
          },
        )
      : []
  return { ...combined, dropColumns }
}

/** A side's features by mean permutation importance, highest first, ties by name: the drop-column candidates. */
export function rankedFeatureNames(measured: Pick<SideMeasurement, 'importances'>): string[] {
  return rankByValue(
    measured.importances.filter((u) => !u.isGroup),
    (u) => u.mean,
  ).map((u) => u.name)
}

/** Sensitivity estimates in the side's feature order then group order; an unused feature gets exact zeros. */
function canonicalSensitivity(
  estimates: readonly SensitivityEstimate[],
  featureOrder: readonly string[],
  groups: readonly FeatureGroup[],
  draws: number,
  countsFlips: boolean,
): SensitivityEstimate[] {
  const byKey = new Map(estimates.map((e) => [`${e.isGroup ? 'g' : 'f'}:${e.name}`, e]))
  const zeros = new Array<number>(draws).fill(0)
  const zero = (name: string, members: readonly string[], isGroup: boolean): SensitivityEstimate => ({
    name,
    members,
    isGroup,
    draws: zeros,
    mean: 0,
    ...(countsFlips ? { flipDraws: zeros, flipShare: 0 } : {}),
  })
  const present = new Set(featureOrder)
  return [
    ...featureOrder.map((name) => byKey.get(`f:${name}`) ?? zero(name, [name], false)),
    ...groups.filter((g) => g.members.every((m) => present.has(m))).map((g) => byKey.get(`g:${g.name}`) ?? zero(g.name, g.members, true)),
  ]
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
