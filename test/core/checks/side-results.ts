import type { SideResult } from '../../../src/core/checks/side-result.ts'
import { computeNoiseFloor } from '../../../src/core/importance/compute-noise-floor.ts'
import type { ImportanceEstimate } from '../../../src/core/importance/permutation-importance.ts'

/**
 * Per unit, its importance in each refit: a number is that refit's mean as a single draw; an array is
 * that refit's draws.
 */
export type UnitValues = readonly (number | readonly number[])[]

export interface SideSpec {
  readonly side?: 'base' | 'head'
  /** Feature name -> per-refit values (data order = key order). */
  readonly features: Readonly<Record<string, UnitValues>>
  /** Group name -> members and per-refit values, after the features. */
  readonly groups?: Readonly<Record<string, { readonly members: readonly string[]; readonly values: UnitValues }>>
  readonly scores?: readonly number[]
  readonly separation?: readonly number[]
  readonly single?: Readonly<Record<string, number>>
  readonly noiseCovers?: SideResult['noiseCovers']
}

/**
 * A SideResult as runGate builds it, from per-refit importances instead of fitted models: the
 * per-refit estimates go through computeNoiseFloor, as measureSide does.
 */
export function sideResult(spec: SideSpec): SideResult {
  const units = [
    ...Object.entries(spec.features).map(([name, values]) => ({ name, members: [name], isGroup: false, values })),
    ...Object.entries(spec.groups ?? {}).map(([name, g]) => ({ name, members: [...g.members], isGroup: true, values: g.values })),
  ]
  const refits = units[0].values.length
  const perRefit: ImportanceEstimate[][] = Array.from({ length: refits }, (_, r) =>
    units.map((u) => {
      const raw = u.values[r]
      const draws = typeof raw === 'number' ? [raw] : [...raw]
      const mean = draws.reduce((s, v) => s + v, 0) / draws.length
      return { name: u.name, members: u.members, isGroup: u.isGroup, draws, mean, sd: NaN, lower: NaN, upper: NaN }
    }),
  )
  return {
    side: spec.side ?? 'head',
    features: Object.keys(spec.features).map((name) => ({ name, kind: 'numeric' as const })),
    scores: spec.scores ?? new Array(refits).fill(0.8),
    separation: spec.separation ?? new Array(refits).fill(0.8),
    importances: computeNoiseFloor(perRefit),
    perRefit,
    singleFeatureSeparation: spec.single ?? {},
    noiseCovers: spec.noiseCovers ?? (refits > 1 ? 'refits-and-draws' : 'draws-only'),
  }
}

/** A value over `refits` refits with a small symmetric jitter (mean `value` for 3, 5 or 7 refits, up to rounding). */
export function steady(value: number, jitter = 0.01, refits = 5): number[] {
  const offsets = [0, 1, -1, 0.5, -0.5, 0.25, -0.25]
  return Array.from({ length: refits }, (_, r) => value + jitter * offsets[r % offsets.length])
}
