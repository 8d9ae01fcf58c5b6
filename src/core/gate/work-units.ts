/**
 * The measurement of both sides as an explicit list of independent work units, and the one path
 * every way of running them shares (in this thread, on a worker pool, from a cache, or read back
 * from the partial files of sharded runs): plan the units, execute them somewhere, combine.
 *
 * Two stages, because the drop-column candidates are ranked by the full refits' importances:
 * 1. refits: per side, refit r (fit, score, permutation importance; one unit for a loaded model);
 * 2. drop-columns: per side, feature f and refit r (the same seed, fitted without f), for the
 *    features `dropColumnNames` picks from the combined first stage.
 * Combining is the same pure code whatever executed the units, so the numbers, and the report,
 * are the same (test/core/gate/work-units.test.ts, test/adapters/check/shard-merge.test.ts).
 */
import { selectFeatures } from '../data/dataset.ts'
import { dropColumnNames } from '../measure-drop-columns.ts'
import {
  combineRefits,
  measureRefit,
  rankedFeatureNames,
  sideRefitSeeds,
  sideRows,
  type RefitMeasurement,
  type SideMeasurement,
  type SideRows,
} from '../measure-side.ts'
import type { Model } from '../models/model.ts'
import type { MeasureJob, MeasureSides } from './gate-inputs.ts'

export type UnitStage = 'refits' | 'drop-columns'

interface UnitBase {
  /** Unique within a run, readable: `base/refit-2`, `head/refit-1/without/<feature>`. */
  readonly id: string
  readonly side: 'base' | 'head'
  /** 0-based refit index; the seed is the full refit's. */
  readonly refit: number
  readonly seed: number
  /** Estimated relative cost (see unitCost), for balancing shards; not a time. */
  readonly cost: number
}
export interface RefitUnit extends UnitBase {
  readonly kind: 'refit'
}
export interface DropColumnUnit extends UnitBase {
  readonly kind: 'drop-column'
  /** The feature left out. */
  readonly feature: string
}
export type WorkUnit = RefitUnit | DropColumnUnit

/** What a unit computes: a refit's part of its side's measurement, or a drop-column refit's holdout score. */
export type UnitResult = { readonly kind: 'refit'; readonly part: RefitMeasurement } | { readonly kind: 'drop-column'; readonly score: number }

/** What an executor may read besides the units: both sides' jobs and their capped rows (sideRows). */
export interface UnitContext {
  readonly jobs: readonly [MeasureJob, MeasureJob]
  readonly rows: readonly [SideRows, SideRows]
}

/** Runs units and returns their results in the same order. */
export type ExecuteUnits = (units: readonly WorkUnit[], context: UnitContext) => Promise<readonly UnitResult[]>

const sideIndex = { base: 0, head: 1 } as const

/**
 * Estimated relative cost of a unit: a fit reads every training cell (rows × features), a refit
 * unit then predicts the capped holdout once per feature, group and draw (and per slice). A
 * proportionality, not a measured time: it only has to rank units for balancing.
 */
function unitCost(job: MeasureJob, rows: SideRows, kind: WorkUnit['kind']): number {
  const features = job.inputs.train.features.length
  const fit = job.inputs.model ? 0 : job.inputs.train.rows * features
  if (kind === 'drop-column') return job.inputs.train.rows * Math.max(features - 1, 1)
  const units = features + job.options.groups.length
  const predictions = (rows.evaluation.rows + rows.slices.reduce((n, s) => n + s.rows.length, 0)) * units * job.options.draws
  return fit + predictions + job.inputs.holdout.rows
}

export function refitUnitId(side: 'base' | 'head', refit: number): string {
  return `${side}/refit-${refit + 1}`
}

export function dropColumnUnitId(side: 'base' | 'head', refit: number, feature: string): string {
  return `${side}/refit-${refit + 1}/without/${feature}`
}

/** Both sides' capped rows, computed once per run (every executor and combineRefits use these). */
export function unitContext(jobs: readonly [MeasureJob, MeasureJob]): UnitContext {
  return { jobs, rows: [sideRows(jobs[0].inputs, jobs[0].options), sideRows(jobs[1].inputs, jobs[1].options)] }
}

/** Stage 1: every refit of both sides, base first, in refit order. */
export function planRefitUnits(context: UnitContext): RefitUnit[] {
  return context.jobs.flatMap((job, j) =>
    sideRefitSeeds(job.inputs, job.options).map((seed, refit) => ({
      kind: 'refit' as const,
      id: refitUnitId(job.inputs.side, refit),
      side: job.inputs.side,
      refit,
      seed,
      cost: unitCost(job, context.rows[j], 'refit'),
    })),
  )
}

/** Each side's refit results combined, from the stage-1 results in planRefitUnits order. */
export function combineSides(context: UnitContext, units: readonly RefitUnit[], results: readonly UnitResult[]): [SideMeasurement, SideMeasurement] {
  const combine = (j: 0 | 1) => {
    const job = context.jobs[j]
    const seeds = sideRefitSeeds(job.inputs, job.options)
    const parts = seeds.map((_, refit) => {
      const k = units.findIndex((u) => u.side === job.inputs.side && u.refit === refit)
      const result = results[k]
      if (k < 0 || !result || result.kind !== 'refit') throw new RangeError(`combineSides: no refit result for ${refitUnitId(job.inputs.side, refit)}`)
      return result.part
    })
    return combineRefits(seeds, context.rows[j], parts)
  }
  return [combine(0), combine(1)]
}

/** Stage 2: the drop-column refits each side's first stage asks for (none for a loaded model or one refit). */
export function planDropColumnUnits(context: UnitContext, combined: readonly [SideMeasurement, SideMeasurement]): DropColumnUnit[] {
  return context.jobs.flatMap((job, j) => {
    const request = job.options.dropColumns
    if (!request || !job.inputs.fit || job.inputs.model) return []
    const seeds = combined[j].refitSeeds
    if (seeds.length < 2) return []
    const cost = unitCost(job, context.rows[j], 'drop-column')
    return dropColumnNames(job.inputs.train, request, rankedFeatureNames(combined[j])).flatMap((feature) =>
      seeds.map((seed, refit) => ({ kind: 'drop-column' as const, id: dropColumnUnitId(job.inputs.side, refit, feature), side: job.inputs.side, refit, seed, feature, cost })),
    )
  })
}

/** The side measurements with their drop-column scores, in planDropColumnUnits order (feature, then refit). */
export function withDropColumns(
  combined: readonly [SideMeasurement, SideMeasurement],
  units: readonly DropColumnUnit[],
  results: readonly UnitResult[],
): [SideMeasurement, SideMeasurement] {
  const sides = combined.map((measured, j) => {
    const side = j === 0 ? 'base' : 'head'
    const byFeature = new Map<string, number[]>()
    units.forEach((unit, k) => {
      if (unit.side !== side) return
      const result = results[k]
      if (!result || result.kind !== 'drop-column') throw new RangeError(`withDropColumns: no drop-column score for ${unit.id}`)
      const scores = byFeature.get(unit.feature) ?? []
      scores[unit.refit] = result.score
      byFeature.set(unit.feature, scores)
    })
    return { ...measured, dropColumns: [...byFeature].map(([name, scores]) => ({ name, scores })) }
  })
  return [sides[0], sides[1]]
}

/** Both stages: plan, execute, combine. Every MeasureSides of plumbline is this with some executor. */
export async function measureByUnits(jobs: readonly [MeasureJob, MeasureJob], execute: ExecuteUnits): Promise<[SideMeasurement, SideMeasurement]> {
  const context = unitContext(jobs)
  const refits = planRefitUnits(context)
  const combined = combineSides(context, refits, await execute(refits, context))
  const drops = planDropColumnUnits(context, combined)
  return withDropColumns(combined, drops, drops.length > 0 ? await execute(drops, context) : [])
}

/** A MeasureSides running every unit through `execute`. */
export function measureSidesWith(execute: ExecuteUnits): MeasureSides {
  return (jobs) => measureByUnits(jobs, execute)
}

/**
 * Units in this thread, in order. A fit that waits on something else (a training command;
 * options.concurrentFits) is asked for all its units at once, so that its own limit on parallel
 * runs decides; a built-in fit computes here, one at a time.
 */
export const executeInProcess: ExecuteUnits = async (units, context) => {
  const fitOf = (unit: WorkUnit): Promise<Model> => {
    const job = context.jobs[sideIndex[unit.side]]
    if (job.inputs.model) return Promise.resolve(job.inputs.model)
    if (!job.inputs.fit) throw new RangeError(`executeInProcess: the ${unit.side} side has neither a model nor a fit`)
    return job.inputs.fit({ side: unit.side, seed: unit.seed, refit: unit.refit, leaveOut: unit.kind === 'drop-column' ? [unit.feature] : [] })
  }
  const prefetched = units.map((unit) => (context.jobs[sideIndex[unit.side]].options.concurrentFits && !context.jobs[sideIndex[unit.side]].inputs.model ? fitOf(unit) : undefined))
  // Awaited below in order, but the failure that surfaces is the first in time: a fit that failed
  // stops the others (createCommandFit), and the one awaited first may be a fit stopped because of it,
  // whose message would hide the cause.
  let firstFailure: { readonly error: unknown } | undefined
  prefetched.forEach((p) => p?.catch((error: unknown) => (firstFailure ??= { error })))
  const results: UnitResult[] = []
  for (const [k, unit] of units.entries()) {
    const j = sideIndex[unit.side]
    const job = context.jobs[j]
    if (unit.kind === 'refit') job.options.onRefit?.(unit.refit, sideRefitSeeds(job.inputs, job.options).length)
    let model: Model
    try {
      model = await (prefetched[k] ?? fitOf(unit))
    } catch (error) {
      throw firstFailure?.error ?? error
    }
    results.push(await executeWithModel(unit, model, job, context.rows[j]))
  }
  return results
}

/** One unit given its fitted model: measureRefit's part, or the drop-column refit's holdout score. */
export async function executeWithModel(unit: WorkUnit, model: Model, job: MeasureJob, rows: SideRows): Promise<UnitResult> {
  if (unit.kind === 'refit') return { kind: 'refit', part: await measureRefit(model, job.inputs, job.options, rows, unit.refit) }
  const holdout = job.inputs.holdout
  if (!holdout.target) throw new RangeError('executeWithModel needs a holdout with a target')
  const prediction = await model.predict(selectFeatures(holdout, model.featureNames))
  return { kind: 'drop-column', score: job.options.metric.compute(holdout.target.values, prediction) }
}

/**
 * Units split into `shards` lists balanced by estimated cost: the longest-processing-time rule
 * (each unit, costliest first, to the least loaded shard; ties to the lower shard, units in plan
 * order), which is within 4/3 of the best makespan (Graham 1969). Each list keeps plan order.
 */
export function assignShards<T extends WorkUnit>(units: readonly T[], shards: number): T[][] {
  if (!Number.isInteger(shards) || shards < 1) throw new RangeError(`assignShards needs a whole number of shards from 1, got ${shards}`)
  const order = units.map((_, k) => k).sort((a, b) => units[b].cost - units[a].cost || a - b)
  const load = new Array<number>(shards).fill(0)
  const owner = new Array<number>(units.length)
  for (const k of order) {
    let best = 0
    for (let s = 1; s < shards; s++) if (load[s] < load[best]) best = s
    owner[k] = best
    load[best] += units[k].cost
  }
  return Array.from({ length: shards }, (_, s) => units.filter((_, k) => owner[k] === s))
}
