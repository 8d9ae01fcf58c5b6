import type { Dataset, FeatureMatrix, Task } from './data/dataset.ts'
import { selectFeatures, selectRows } from './data/dataset.ts'
import { computeNoiseFloor, type FlooredImportance } from './importance/compute-noise-floor.ts'
import { permutationImportance, type FeatureGroup, type ImportanceEstimate } from './importance/permutation-importance.ts'
import type { Metric } from './metrics/metric.ts'
import { rocAuc } from './metrics/roc-auc.ts'
import { rSquared } from './metrics/r-squared.ts'
import type { Fit, Model } from './models/model.ts'
import { createRandom, deriveSeed, shuffledIndices } from './statistics/random.ts'
import { measureDropColumns, type DropColumnRequest, type DropColumnScores } from './measure-drop-columns.ts'

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
  /** Drop-column (LOCO) refits after the full ones, with the same seeds; none for a loaded model. */
  readonly dropColumns?: DropColumnRequest
}

export interface SideMeasurement {
  readonly refitSeeds: readonly number[]
  readonly scores: readonly number[]
  readonly separation: readonly number[]
  readonly importances: readonly FlooredImportance[]
  readonly perRefit: readonly (readonly ImportanceEstimate[])[]
  readonly evaluationRows: number
  readonly referenceRows: number
  readonly model: { readonly kind: string; readonly featureNames: readonly string[] }
  /** Holdout predictions of the first refit, for a paired bootstrap when there is one refit. */
  readonly firstPredictions: Float64Array
  readonly noiseCovers: 'refits-and-draws' | 'draws-only'
  /** Holdout scores of the drop-column refits, per feature (empty for a loaded model or when not asked). */
  readonly dropColumns: readonly DropColumnScores[]
}

/** The seed of refit r. The same on both sides, so a change that alters nothing alters no number. */
export function refitSeed(seed: number, refit: number): number {
  return deriveSeed(seed, 'refit', refit)
}

/**
 * One side's refits: for each of R refits (seeds derived from the policy seed), fit, score on the
 * whole holdout, and measure permutation importance on the (capped) holdout with K draws from the
 * (capped) reference rows; then the noise floor over refits. The capped row samples depend only on
 * the seed and row counts, so both sides use the same rows when their holdouts match.
 */
export async function measureSide(inputs: MeasureSideInputs, options: MeasureSideOptions): Promise<SideMeasurement> {
  const { holdout, train } = inputs
  const target = holdout.target
  if (!target) throw new RangeError('measureSide needs a holdout with a target')
  const refits = inputs.model ? 1 : options.refits
  const evaluation = capRows(holdout, options.evaluationRows, deriveSeed(options.seed, 'evaluation-rows'))
  const reference = capRows(inputs.reference, options.referenceRows, deriveSeed(options.seed, 'reference-rows'))
  const featureOrder = train.features.map((f) => f.name)

  const refitSeeds: number[] = []
  const scores: number[] = []
  const separation: number[] = []
  const perRefit: ImportanceEstimate[][] = []
  let firstPredictions: Float64Array = new Float64Array(0)
  let modelInfo = { kind: '', featureNames: [] as readonly string[] }
  for (let r = 0; r < refits; r++) refitSeeds.push(refitSeed(options.seed, r))
  const fitRefit = (r: number) => inputs.fit!({ side: inputs.side, seed: refitSeeds[r], refit: r, leaveOut: [] })
  // A fit that waits on something else (a training command) is asked for every refit at once, so that
  // its own limit on parallel runs decides; a built-in fit computes in this thread, one at a time.
  const prefetched = !inputs.model && options.concurrentFits ? refitSeeds.map((_, r) => fitRefit(r)) : undefined
  prefetched?.forEach((p) => p.catch(() => undefined)) // awaited below in order; a failure surfaces there
  for (let r = 0; r < refits; r++) {
    options.onRefit?.(r, refits)
    const model = inputs.model ?? (await (prefetched ? prefetched[r] : fitRefit(r)))
    modelInfo = { kind: model.kind, featureNames: model.featureNames }
    const prediction = await model.predict(selectFeatures(holdout, model.featureNames))
    if (r === 0) firstPredictions = prediction
    scores.push(options.metric.compute(target.values, prediction))
    separation.push(options.task === 'binary' ? rocAuc(target.values, prediction) : rSquared(target.values, prediction))
    const result = await permutationImportance(model, evaluation as typeof evaluation & { target: { values: Float64Array } }, {
      metric: options.metric,
      draws: options.draws,
      seed: deriveSeed(options.seed, 'draws', r),
      reference,
      groups: options.groups,
    })
    perRefit.push(canonicalOrder(result.importances, featureOrder, options.groups, options.draws))
  }
  const importances = computeNoiseFloor(perRefit)
  const dropColumns =
    inputs.fit && options.dropColumns && refits >= 2
      ? await measureDropColumns(
          { side: inputs.side, train, holdout, fit: inputs.fit },
          {
            request: options.dropColumns,
            ranked: importances.filter((u) => !u.isGroup).sort((a, b) => b.mean - a.mean || (a.name < b.name ? -1 : 1)).map((u) => u.name),
            refitSeeds,
            metric: options.metric,
            concurrentFits: options.concurrentFits,
          },
        )
      : []
  return {
    refitSeeds,
    scores,
    separation,
    importances,
    perRefit,
    evaluationRows: evaluation.rows,
    referenceRows: reference.rows,
    model: modelInfo,
    firstPredictions,
    noiseCovers: refits < 2 ? 'draws-only' : 'refits-and-draws',
    dropColumns,
  }
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
