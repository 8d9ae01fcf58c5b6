/**
 * The policy's slices as one stage: each slice's rows on both sides (planSlices, the same plan the
 * measurement used), its per-refit scores and importances from the measurement, the slice checks,
 * and the report's rows.
 */
import { checkSlices, type SliceSides } from '../checks/slice-findings.ts'
import { describeSliceFilter, sliceColumns } from '../data/slice-rows.ts'
import type { SideMeasurement, SliceMeasurement } from '../measure-side.ts'
import { metricByName } from '../metrics/metric-by-name.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { Finding, SliceRow, SliceSideSummary } from '../report/report.ts'
import type { SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'
import { planSlices } from './plan-slices.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

export function judgeSlices(inputs: {
  readonly settings: GateSettings
  readonly sides: { readonly base: SideInputs; readonly head: SideInputs }
  readonly measured: readonly [SideMeasurement, SideMeasurement]
  readonly touched: ReadonlySet<string>
}): { readonly findings: readonly Finding[]; readonly slices?: readonly SliceRow[] } {
  const { settings } = inputs
  if (settings.policySlices.length === 0 || settings.checks.slices.action === 'off') return { findings: [] }
  const plan = (side: 'base' | 'head') =>
    planSlices(settings.policySlices, inputs.sides[side].holdout, side, { task: settings.task, minRows: settings.checks.slices.minRows })
  const basePlan = plan('base')
  const headPlan = plan('head')
  const measuredOn = (m: SideMeasurement) => new Map((m.slices ?? []).map((s) => [s.name, s]))
  const baseMeasured = measuredOn(inputs.measured[0])
  const headMeasured = measuredOn(inputs.measured[1])
  const metric = metricByName(settings.metric, settings.task)

  const sides: SliceSides[] = settings.policySlices.map((slice, i) => {
    const head = headPlan[i]
    const b = baseMeasured.get(slice.name)
    const h = headMeasured.get(slice.name)
    return {
      name: slice.name,
      definition: describeSliceFilter(slice.where),
      filterColumns: sliceColumns(slice.where),
      status: head.status === 'no-column' ? 'measured' : head.status,
      headRows: head.status === 'measured' ? head.rows.length : head.status === 'no-column' ? 0 : head.rowCount,
      ...(b ? { base: b } : {}),
      ...(h ? { head: h } : {}),
    }
  })
  const overall = inputs.measured[1].importances
  const judged = checkSlices(sides, overall, inputs.touched, {
    ...settings.checks.slices,
    metric: metric.name,
    higherIsBetter: metric.higherIsBetter,
    alpha: settings.checks.score.alpha,
    dominanceShare: settings.checks.leakage.dominanceShare,
    runnerUpRatio: settings.checks.leakage.runnerUpRatio,
  })
  const rows: SliceRow[] = sides.map((s, i) => {
    const base = basePlan[i]
    const change = judged.changes.get(s.name)
    return {
      name: s.name,
      definition: s.definition,
      status: s.status,
      rows: { base: base.status === 'no-column' ? null : base.status === 'measured' ? base.rows.length : base.rowCount, head: s.headRows },
      ...(baseMeasured.has(s.name) ? { base: summary(baseMeasured.get(s.name)!, s.filterColumns) } : {}),
      ...(headMeasured.has(s.name) ? { head: summary(headMeasured.get(s.name)!, s.filterColumns) } : {}),
      ...(change ? { scoreChange: change } : {}),
    }
  })
  return { findings: judged.findings, slices: rows }
}

/** Top features on the slice's rows, without the columns its filter names (they hardly vary inside it). */
function summary(m: SliceMeasurement, filterColumns: readonly string[]): SliceSideSummary {
  const features = rankByValue(
    m.importances.filter((u) => !u.isGroup && !filterColumns.includes(u.name)),
    (u) => u.mean,
  )
  const total = features.reduce((s, u) => s + Math.max(0, u.mean), 0)
  const top = (u: FlooredImportance) => ({ name: u.name, mean: u.mean, share: total > 0 ? Math.max(0, u.mean) / total : NaN, isAboveFloor: u.isAboveFloor })
  return { rows: m.rows, scores: m.scores, scoreMean: m.scores.reduce((a, b) => a + b, 0) / m.scores.length, top: features.slice(0, 5).map(top) }
}
