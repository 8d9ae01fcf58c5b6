import type { Dataset } from './data/dataset.ts'
import { selectFeatures } from './data/dataset.ts'
import type { FlooredImportance } from './importance/compute-noise-floor.ts'
import type { FeatureGroup } from './importance/permutation-importance.ts'
import type { Metric } from './metrics/metric.ts'
import type { Fit } from './models/model.ts'
import { rankByValue } from './statistics/rank-by-value.ts'

/**
 * Which features a side refits without: every one in `also` it has, plus its top `top` by
 * permutation importance; and which feature groups it refits without all their members at once:
 * every group holding a feature of `also`, plus its top `groupTop` groups by grouped permutation
 * importance above the noise floor. The members of a chosen group above the floor are then refitted
 * without one by one, at most `groupMembers` per group (the drill-down).
 */
export interface DropColumnRequest {
  readonly top: number
  readonly also: readonly string[]
  readonly groupTop: number
  readonly groupMembers: number
}

/** What one drop-column refit leaves out: one feature (members = [name]) or a group's members together. */
export interface LeaveOutSet {
  readonly name: string
  readonly members: readonly string[]
  readonly isGroup: boolean
}

/** One leave-out set's drop-column refits: the holdout score of refit r fitted without it, seed for seed the full refit's. */
export interface DropColumnScores extends LeaveOutSet {
  readonly scores: readonly number[]
}

/**
 * The features a side refits without, in order: every one in `request.also` it has, then its top
 * `request.top` of `ranked` (highest permutation importance first); none with fewer than 2 features.
 */
export function dropColumnNames(train: Pick<Dataset, 'features'>, request: DropColumnRequest, ranked: readonly string[]): string[] {
  const present = new Set(train.features.map((f) => f.name))
  if (present.size < 2) return []
  return [...new Set([...request.also.filter((n) => present.has(n)), ...ranked.slice(0, request.top)])]
}

/**
 * The groups a side refits without (members left out together), in order: every group of `groups`
 * whose members the side has and that holds a feature of `request.also` (in `groups` order), then
 * the top `request.groupTop` of the rest by grouped permutation importance, among those above the
 * noise floor (highest mean first, ties by name). A group holding every feature of the side is
 * skipped (nothing would be left to fit).
 */
export function dropGroupNames(
  train: Pick<Dataset, 'features'>,
  request: DropColumnRequest,
  groups: readonly FeatureGroup[],
  importances: readonly FlooredImportance[],
): FeatureGroup[] {
  const present = new Set(train.features.map((f) => f.name))
  const usable = groups.filter((g) => g.members.length < present.size && g.members.every((m) => present.has(m)))
  const also = new Set(request.also)
  const touched = usable.filter((g) => g.members.some((m) => also.has(m)))
  const estimate = new Map(importances.filter((u) => u.isGroup).map((u) => [u.name, u]))
  const ranked = rankByValue(
    usable.filter((g) => !touched.includes(g) && estimate.get(g.name)?.isAboveFloor === true),
    (g) => estimate.get(g.name)!.mean,
  )
  return [...touched, ...ranked.slice(0, request.groupTop)]
}

/**
 * Every leave-out set of a side, in the order its units are planned: the single features of
 * dropColumnNames, then the drill-down (members of a chosen group whose grouped permutation
 * importance is above the floor, in member order, at most `request.groupMembers` per group, each
 * once), then the groups of dropGroupNames; none with fewer than 2 features.
 */
export function leaveOutSets(
  train: Pick<Dataset, 'features'>,
  request: DropColumnRequest,
  groups: readonly FeatureGroup[],
  importances: readonly FlooredImportance[],
  ranked: readonly string[],
): LeaveOutSet[] {
  if (train.features.length < 2) return []
  const features = dropColumnNames(train, request, ranked)
  const chosen = dropGroupNames(train, request, groups, importances)
  const aboveFloor = new Set(importances.filter((u) => u.isGroup && u.isAboveFloor).map((u) => u.name))
  const singles = new Set(features)
  for (const group of chosen.filter((g) => aboveFloor.has(g.name))) {
    for (const member of group.members.filter((m) => !singles.has(m)).slice(0, request.groupMembers)) singles.add(member)
  }
  return [
    ...[...singles].map((name) => ({ name, members: [name], isGroup: false })),
    ...chosen.map((g) => ({ name: g.name, members: [...g.members], isGroup: true })),
  ]
}

/**
 * Drop-column refits (LOCO) of one side: for each leave-out set (leaveOutSets: single features, then
 * groups with their members left out together) and each refit seed, the side's own Fit with
 * `leaveOut` the set's members and the same derived seed as the full refit, so that refit r with
 * and without the set form a matched pair; scored with the policy metric on the whole holdout.
 * A fit that waits on something else (a training command) is asked for every refit at once.
 * `ranked` is the side's features by permutation importance, highest first; `importances` the
 * side's floored importances (groups included), which rank the groups.
 */
export async function measureDropColumns(
  inputs: {
    readonly side: 'base' | 'head'
    readonly train: Dataset
    readonly holdout: Dataset
    readonly fit: Fit
    /**
     * The holdout score of refit r fitted without `set`, computed elsewhere (a worker of the refit
     * pool) with the same pure code; when given, every pair is asked for at once.
     */
    readonly scoreWithout?: (set: LeaveOutSet, refit: number) => Promise<number>
  },
  options: {
    readonly request: DropColumnRequest
    readonly ranked: readonly string[]
    readonly groups: readonly FeatureGroup[]
    readonly importances: readonly FlooredImportance[]
    readonly refitSeeds: readonly number[]
    readonly metric: Metric
    readonly concurrentFits?: boolean
  },
): Promise<DropColumnScores[]> {
  const sets = leaveOutSets(inputs.train, options.request, options.groups, options.importances, options.ranked)
  if (sets.length === 0) return []
  const target = inputs.holdout.target
  if (!target) throw new RangeError('measureDropColumns needs a holdout with a target')
  if (inputs.scoreWithout) {
    const scoreWithout = inputs.scoreWithout
    return Promise.all(sets.map(async (set) => ({ ...set, scores: await Promise.all(options.refitSeeds.map((_, r) => scoreWithout(set, r))) })))
  }
  const fitOne = (set: LeaveOutSet, r: number) => inputs.fit({ side: inputs.side, seed: options.refitSeeds[r], refit: r, leaveOut: set.members })
  const prefetched = options.concurrentFits ? sets.map((set) => options.refitSeeds.map((_, r) => fitOne(set, r))) : undefined
  prefetched?.flat().forEach((p) => p.catch(() => undefined))
  const results: DropColumnScores[] = []
  for (const [i, set] of sets.entries()) {
    const scores: number[] = []
    for (let r = 0; r < options.refitSeeds.length; r++) {
      const model = await (prefetched ? prefetched[i][r] : fitOne(set, r))
      const prediction = await model.predict(selectFeatures(inputs.holdout, model.featureNames))
      scores.push(options.metric.compute(target.values, prediction))
    }
    results.push({ ...set, scores })
  }
  return results
}
