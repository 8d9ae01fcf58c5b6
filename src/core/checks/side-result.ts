import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { DropColumnEstimate } from '../importance/drop-column-importance.ts'
import type { ImportanceEstimate } from '../importance/permutation-importance.ts'
import type { SliceSeparation } from '../importance/single-feature-separation.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

/** What the checks know about one side after its refits: pure numbers, no models. */
export interface SideResult {
  readonly side: 'base' | 'head'
  /** Feature columns with their kinds, in data order. */
  readonly features: readonly { readonly name: string; readonly kind: 'numeric' | 'categorical' }[]
  /** Policy metric on the holdout, per refit. */
  readonly scores: readonly number[]
  /** AUC (binary), macro one-vs-rest AUC (multiclass) or R² (regression) of the full model on the holdout, per refit. */
  readonly separation: readonly number[]
  /** Features first (data order), then groups. */
  readonly importances: readonly FlooredImportance[]
  /** Per refit, the raw estimates (same order as `importances`). */
  readonly perRefit: readonly (readonly ImportanceEstimate[])[]
  /** A one-feature built-in model's holdout AUC / R², for the features it was computed for. */
  readonly singleFeatureSeparation: Readonly<Record<string, number>>
  /** Multiclass only: per feature, the class whose one-vs-rest AUC `singleFeatureSeparation` is (the best one). */
  readonly singleFeatureClasses?: Readonly<Record<string, string>>
  /** Per feature, the slice (a value of a categorical column) its one-feature model separates best. */
  readonly singleFeatureSlices?: Readonly<Record<string, SliceSeparation>>
  /** The policy metric per refit as a loss (lossOfScore: 0 is perfect), in refit order. */
  readonly losses?: readonly number[]
  /** Drop-column (LOCO) importance in loss units, for the features refitted without. */
  readonly dropColumns?: Readonly<Record<string, DropColumnEstimate>>
  /** The same for the groups refitted without all their members at once, by group name. */
  readonly dropGroups?: Readonly<Record<string, DropColumnEstimate>>
  /** 'draws-only' when the model was loaded, not refitted. */
  readonly noiseCovers: 'refits-and-draws' | 'draws-only'
}

/** Features (not groups) of a side, ranked by mean importance, highest first; ties by name. */
export function rankFeatures(importances: readonly FlooredImportance[]): FlooredImportance[] {
  return rankByValue(
    importances.filter((u) => !u.isGroup),
    (u) => u.mean,
  )
}

/**
 * The one rank the report uses, in the table, the status and the findings: 1-based by mean
 * importance among this side's features, highest first, ties by name; groups are ranked among
 * groups. Keyed by `rankKey`.
 */
export function sideRanks(importances: readonly FlooredImportance[]): Map<string, number> {
  const ranks = new Map<string, number>()
  for (const isGroup of [false, true]) {
    rankByValue(
      importances.filter((u) => u.isGroup === isGroup),
      (u) => u.mean,
    ).forEach((u, i) => ranks.set(rankKey(u), i + 1))
  }
  return ranks
}

export function rankKey(unit: { readonly name: string; readonly isGroup: boolean }): string {
  return `${unit.isGroup}:${unit.name}`
}

/** Share of the total positive importance among features (groups excluded from the total). */
export function positiveShare(importances: readonly FlooredImportance[], name: string): number {
  let total = 0
  let own = 0
  for (const u of importances) {
    if (u.isGroup && u.name !== name) continue
    const v = Math.max(0, u.mean)
    if (!u.isGroup) total += v
    if (u.name === name) own = v
  }
  return total > 0 ? own / total : 0
}

export function mean(values: readonly number[]): number {
  let s = 0
  for (const v of values) s += v
  return values.length ? s / values.length : NaN
}
