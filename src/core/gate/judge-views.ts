/**
 * The views beside permutation importance, as one stage: prediction sensitivity (holdout and
 * unlabeled rows), the built-in trees' gain and the policy's slices (judge-slices.ts), each
 * summarized over refits for the report and judged by its check. Pure: reads the measured sides only.
 */
import { checkGainNoise, profileLooksLikeIdentifier, type GainFeature } from '../checks/gain-noise.ts'
import { profileColumn } from '../data/profile-column.ts'
import { checkGroupCarried } from '../checks/group-carried.ts'
import { checkSensitivity, type SensitivitySample, type SensitivitySideSamples } from '../checks/sensitivity-change.ts'
import type { SideResult } from '../checks/side-result.ts'
import type { FeatureMatrix } from '../data/dataset.ts'
import type { SensitivityEstimate } from '../importance/prediction-sensitivity.ts'
import type { SideMeasurement } from '../measure-side.ts'
import { gainCaution, type Finding, type GainReport, type GateReport, type SliceRow, type GainValue, type SensitivityReport, type SensitivitySide, type SensitivityValue } from '../report/report.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'
import { sampleStandardDeviation } from '../statistics/sample-standard-deviation.ts'
import type { SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'
import { judgeSlices } from './judge-slices.ts'

export interface ViewsOutcome {
  readonly findings: readonly Finding[]
  readonly sensitivity?: SensitivityReport
  readonly gain?: GainReport
  readonly slices?: readonly SliceRow[]
  readonly groups?: GateReport['groups']
}

export function judgeViews(inputs: {
  readonly settings: GateSettings
  readonly sides: { readonly base: SideInputs; readonly head: SideInputs }
  readonly measured: readonly [SideMeasurement, SideMeasurement]
  readonly results: { readonly base: SideResult; readonly head: SideResult }
  /** Features the pull request added or changed. */
  readonly touched: ReadonlySet<string>
}): ViewsOutcome {
  const [base, head] = inputs.measured
  const findings: Finding[] = []
  let sensitivity: SensitivityReport | undefined
  if (head.sensitivity) {
    const baseSamples = base.sensitivity ? sideSamples(base.sensitivity) : undefined
    const headSamples = sideSamples(head.sensitivity)
    const judged = checkSensitivity(baseSamples, headSamples, inputs.settings.checks.sensitivity)
    findings.push(...judged.findings)
    sensitivity = {
      threshold: inputs.settings.task === 'binary' ? 0.5 : null,
      ...(inputs.settings.task === 'multiclass' ? { decision: 'most-probable-class' as const } : {}),
      unlabeledRows: { base: base.sensitivity?.unlabeledRows ?? 0, head: head.sensitivity.unlabeledRows },
      features: sensitivityRows(base.sensitivity, head.sensitivity, judged.changes),
    }
  }
  let gain: GainReport | undefined
  if (head.splitStatistics || base.splitStatistics) {
    const headGain = meanGain(head.splitStatistics)
    const importance = new Map(inputs.results.head.importances.filter((u) => !u.isGroup).map((u) => [u.name, u]))
    const features: GainFeature[] = [...headGain.entries()].map(([name, g]) => ({
      name,
      gain: g.gain,
      splits: g.splits,
      ...trainingColumn(inputs.sides.head.train, name),
      importance: importance.get(name)?.mean ?? 0,
      isAboveFloor: importance.get(name)?.isAboveFloor ?? false,
    }))
    findings.push(...checkGainNoise(features, inputs.touched, inputs.settings.checks.gain))
    gain = { caution: gainCaution, features: gainRows(rankGain(meanGain(base.splitStatistics)), rankGain(headGain)) }
  }
  const sliced = judgeSlices(inputs)
  findings.push(...sliced.findings)
  const carried = checkGroupCarried(inputs.results.head, inputs.touched, inputs.settings.checks.correlatedGroups)
  // A member of a group that carries it shares its work with the others: its own sensitivity falling
  // or rising is the redundancy the group finding reports, not a change of its own.
  const members = new Map(carried.flatMap((f) => inputs.results.head.importances.filter((u) => u.isGroup && u.name === f.evidence.group).flatMap((g) => g.members.map((m) => [m, g.name] as const))))
  findings.forEach((f, i) => {
    if (f.kind === 'sensitivity-shift' && f.feature !== undefined && members.has(f.feature)) {
      findings[i] = { ...f, severity: 'info', message: `${f.message} ${f.feature} is in the correlated group ${members.get(f.feature)}, which carries it: the change is likely the group sharing the work.` }
    }
  })
  findings.push(...carried)
  const automatic = new Map(inputs.settings.automaticGroups.map((g) => [g.name, g]))
  const groups = inputs.settings.groups.map((g) => ({ name: g.name, members: g.members, automatic: automatic.has(g.name), weakestLink: automatic.get(g.name)?.weakestLink ?? null }))
  return {
    findings,
    ...(sensitivity ? { sensitivity } : {}),
    ...(gain ? { gain } : {}),
    ...(sliced.slices ? { slices: sliced.slices } : {}),
    ...(groups.length > 0 ? { groups } : {}),
  }
}

type PerRefit = readonly (readonly SensitivityEstimate[])[]

function sample(refits: PerRefit, index: number): SensitivitySample {
  const unit = refits[0][index]
  const perRefit = refits.map((r) => r[index].mean)
  const flips = refits.map((r) => r[index].flipShare)
  return {
    name: unit.name,
    isGroup: unit.isGroup,
    mean: average(perRefit),
    samples: refits.length >= 2 ? perRefit : unit.draws,
    ...(flips.every((f): f is number => f !== undefined) ? { flipShare: average(flips) } : {}),
  }
}

function sideSamples(s: NonNullable<SideMeasurement['sensitivity']>): SensitivitySideSamples {
  return {
    holdout: s.holdout[0].map((_, i) => sample(s.holdout, i)),
    ...(s.unlabeled && s.unlabeled.length > 0 ? { unlabeled: s.unlabeled[0].map((_, i) => sample(s.unlabeled!, i)) } : {}),
  }
}

function value(refits: PerRefit, index: number): SensitivityValue {
  const s = sample(refits, index)
  const perRefit = refits.map((r) => r[index].mean)
  return { mean: s.mean, refitSd: perRefit.length >= 2 ? sampleStandardDeviation(perRefit) : NaN, flipShare: s.flipShare ?? null, perRefit }
}

function sensitivityRows(
  base: SideMeasurement['sensitivity'],
  head: NonNullable<SideMeasurement['sensitivity']>,
  changes: ReturnType<typeof checkSensitivity>['changes'],
): SensitivityReport['features'] {
  const side = (s: NonNullable<SideMeasurement['sensitivity']> | undefined) => {
    const out = new Map<string, SensitivitySide>()
    if (!s || s.holdout.length === 0) return out
    s.holdout[0].forEach((unit, i) => {
      out.set(`${unit.isGroup}:${unit.name}`, {
        holdout: value(s.holdout, i),
        ...(s.unlabeled && s.unlabeled.length > 0 ? { unlabeled: value(s.unlabeled, i) } : {}),
      })
    })
    return out
  }
  const b = side(base)
  const h = side(head)
  const units = [...(head.holdout[0] ?? []), ...(base?.holdout[0] ?? [])]
  const seen = new Set<string>()
  const rows = units
    .filter((u) => {
      const key = `${u.isGroup}:${u.name}`
      if (seen.has(key)) return false
      seen.add(key)
      return true
    })
    .map((u) => {
      const key = `${u.isGroup}:${u.name}`
      const change = b.has(key) && h.has(key) ? changes.get(u.name) : undefined
      return { name: u.name, isGroup: u.isGroup, ...(b.has(key) ? { base: b.get(key)! } : {}), ...(h.has(key) ? { head: h.get(key)! } : {}), ...(change ? { change } : {}) }
    })
  const order = (r: (typeof rows)[number]) => r.head?.holdout.mean ?? -Infinity
  return rows.sort((x, y) => Number(x.isGroup) - Number(y.isGroup) || order(y) - order(x) || (x.base?.holdout.mean ?? 0) - (y.base?.holdout.mean ?? 0) || (x.name < y.name ? -1 : 1))
}

function meanGain(perRefit: SideMeasurement['splitStatistics']): Map<string, { gain: number; splits: number }> {
  const out = new Map<string, { gain: number; splits: number }>()
  if (!perRefit || perRefit.length === 0) return out
  for (const refit of perRefit) {
    for (const s of refit) {
      const entry = out.get(s.feature) ?? { gain: 0, splits: 0 }
      entry.gain += s.gain / perRefit.length
      entry.splits += s.splits / perRefit.length
      out.set(s.feature, entry)
    }
  }
  return out
}

function rankGain(gains: ReadonlyMap<string, { gain: number; splits: number }>): Map<string, GainValue> {
  const total = [...gains.values()].reduce((s, g) => s + Math.max(0, g.gain), 0)
  const sorted = rankByValue([...gains.entries()].map(([name, g]) => ({ name, ...g })), (g) => g.gain)
  return new Map(sorted.map((g, i) => [g.name, { gain: g.gain, splits: g.splits, share: total > 0 ? Math.max(0, g.gain) / total : NaN, rank: i + 1 }]))
}

function gainRows(base: ReadonlyMap<string, GainValue>, head: ReadonlyMap<string, GainValue>): GainReport['features'] {
  const names = [...new Set([...head.keys(), ...base.keys()])]
  return names.map((name) => ({ name, ...(base.has(name) ? { base: base.get(name)! } : {}), ...(head.has(name) ? { head: head.get(name)! } : {}) }))
}

/** The gain check's view of a training column: its distinct values and whether it looks like an id (one pass). */
function trainingColumn(data: FeatureMatrix, name: string): { distinct: number; idLike: boolean } {
  const j = data.features.findIndex((f) => f.name === name)
  if (j < 0) return { distinct: 0, idLike: false }
  const profile = profileColumn(data.columns[j])
  return { distinct: profile.distinct, idLike: profileLooksLikeIdentifier(data.features[j].kind, profile) }
}

function average(values: readonly number[]): number {
  let s = 0
  for (const v of values) s += v
  return s / values.length
}
