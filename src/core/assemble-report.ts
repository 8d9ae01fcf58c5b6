import type { Shift } from './checks/rank-shift.ts'
import { positiveShare, type SideResult } from './checks/side-result.ts'
import type { CheckAction } from './checks/leakage.ts'
import type { Dataset } from './data/dataset.ts'
import type { FlooredImportance } from './importance/compute-noise-floor.ts'
import type { SideMeasurement } from './measure-side.ts'
import type { FeatureRow, Finding, GateReport, SideImportance, SideSummary } from './report/report.ts'
import type { GateInputs, SideInputs } from './run-gate.ts'

export function diffFeatureSets(base: Dataset, head: Dataset): GateReport['featureSet'] {
  const baseKinds = new Map(base.features.map((f) => [f.name, f.kind]))
  const headKinds = new Map(head.features.map((f) => [f.name, f.kind]))
  return {
    added: head.features.filter((f) => !baseKinds.has(f.name)).map((f) => f.name),
    removed: base.features.filter((f) => !headKinds.has(f.name)).map((f) => f.name),
    kindChanged: head.features
      .filter((f) => baseKinds.has(f.name) && baseKinds.get(f.name) !== f.kind)
      .map((f) => ({ name: f.name, base: baseKinds.get(f.name)!, head: f.kind })),
  }
}

/**
 * Features on both sides whose values differ: compared on the holdout rows when both sides have the
 * same number of them (the holdout-rows check makes sure they are the same rows), else on the
 * training rows when those counts match. Categorical values are compared as text, not codes. With
 * neither count matching nothing can be said and no feature is marked changed.
 */
export function changedFeatures(base: SideInputs, head: SideInputs): Set<string> {
  const pick = base.holdout.rows === head.holdout.rows ? [base.holdout, head.holdout] : base.train.rows === head.train.rows ? [base.train, head.train] : null
  const changed = new Set<string>()
  if (!pick) return changed
  const [b, h] = pick
  const bIndex = new Map(b.features.map((f, j) => [f.name, j]))
  h.features.forEach((hf, hj) => {
    const bj = bIndex.get(hf.name)
    if (bj === undefined) return
    const bf = b.features[bj]
    const bc = b.columns[bj]
    const hc = h.columns[hj]
    const decode = (kind: string, categories: readonly string[] | undefined, v: number) =>
      Number.isNaN(v) ? 'NaN' : kind === 'categorical' ? (categories?.[v] ?? String(v)) : v
    for (let i = 0; i < hc.length; i++) {
      if (decode(bf.kind, bf.categories, bc[i]) !== decode(hf.kind, hf.categories, hc[i])) {
        changed.add(hf.name)
        return
      }
    }
  })
  return changed
}

export function featureSetFindings(
  featureSet: GateReport['featureSet'],
  head: SideResult,
  action: CheckAction,
): Finding[] {
  const findings: Finding[] = []
  const { added, removed, kindChanged } = featureSet
  if (action !== 'off' && (added.length || removed.length || kindChanged.length)) {
    const parts = [
      added.length ? `added ${list(added)}` : '',
      removed.length ? `removed ${list(removed)}` : '',
      kindChanged.length ? `changed the kind of ${list(kindChanged.map((k) => `${k.name} (${k.base} → ${k.head})`))}` : '',
    ].filter(Boolean)
    findings.push({
      kind: 'feature-set',
      severity: 'info',
      title: `This pull request ${parts.join('; ')}.`,
      message: `Features are compared by column name. ${added.length} added, ${removed.length} removed, ${kindChanged.length} changed kind.`,
      evidence: { added: added.length, removed: removed.length, kindChanged: kindChanged.length },
    })
  }
  const byName = new Map(head.importances.map((u) => [u.name, u]))
  for (const name of added) {
    const unit = byName.get(name)
    if (unit && !unit.isAboveFloor) {
      findings.push({
        kind: 'unused-feature',
        severity: 'info',
        feature: name,
        title: `The added feature ${name} is not measurably used by the candidate model.`,
        message: `Its importance ${fmtPlain(unit.mean)} has a 95% interval [${fmtPlain(unit.lower)}, ${fmtPlain(unit.upper)}] that does not lie above zero.`,
        evidence: { mean: unit.mean, lower: unit.lower, upper: unit.upper },
      })
    }
  }
  return findings
}

export function featureRows(
  base: SideResult,
  head: SideResult,
  shifts: ReadonlyMap<string, Shift>,
  baseTrain: Dataset,
  headTrain: Dataset,
): FeatureRow[] {
  const kindOf = new Map<string, 'numeric' | 'categorical'>()
  for (const f of [...baseTrain.features, ...headTrain.features]) kindOf.set(f.name, f.kind)
  const stats = (side: SideResult) => {
    const ranks = new Map<string, number>()
    const order = (units: FlooredImportance[]) =>
      units.sort((a, b) => b.mean - a.mean || (a.name < b.name ? -1 : 1)).forEach((u, i) => ranks.set(`${u.isGroup}:${u.name}`, i + 1))
    order(side.importances.filter((u) => !u.isGroup))
    order(side.importances.filter((u) => u.isGroup))
    return new Map(
      side.importances.map((u): [string, SideImportance] => [
        `${u.isGroup}:${u.name}`,
        {
          mean: u.mean,
          lower: u.lower,
          upper: u.upper,
          refitSd: u.refitSd,
          drawSd: u.drawSd,
          rank: ranks.get(`${u.isGroup}:${u.name}`)!,
          share: positiveShare(side.importances, u.name),
          isAboveFloor: u.isAboveFloor,
          perRefit: u.perRefit,
          ...(side.singleFeatureSeparation[u.name] !== undefined && !u.isGroup
            ? { singleFeatureScore: side.singleFeatureSeparation[u.name] }
            : {}),
        },
      ]),
    )
  }
  const b = stats(base)
  const h = stats(head)
  const rows: FeatureRow[] = []
  const seen = new Set<string>()
  const push = (unit: FlooredImportance) => {
    const key = `${unit.isGroup}:${unit.name}`
    if (seen.has(key)) return
    seen.add(key)
    const bs = b.get(key)
    const hs = h.get(key)
    rows.push({
      name: unit.name,
      isGroup: unit.isGroup,
      ...(unit.isGroup ? { members: unit.members } : {}),
      presence: bs && hs ? 'both' : hs ? 'added' : 'removed',
      kind: unit.isGroup ? 'group' : kindOf.get(unit.name),
      ...(bs ? { base: bs } : {}),
      ...(hs ? { head: hs } : {}),
      ...(bs && hs && shifts.has(unit.name) ? { shift: shifts.get(unit.name)! } : {}),
    })
  }
  const byMean = (units: readonly FlooredImportance[]) =>
    [...units].sort((x, y) => Number(x.isGroup) - Number(y.isGroup) || y.mean - x.mean || (x.name < y.name ? -1 : 1))
  byMean(head.importances).forEach(push)
  byMean(base.importances).forEach(push)
  return rows
}

export function describeSides(inputs: GateInputs, base: SideMeasurement, head: SideMeasurement): GateReport['sides'] {
  const describe = (side: 'base' | 'head', data: SideInputs, m: SideMeasurement): SideSummary => {
    const meanScore = m.scores.reduce((s, v) => s + v, 0) / m.scores.length
    const sd =
      m.scores.length > 1 ? Math.sqrt(m.scores.reduce((s, v) => s + (v - meanScore) ** 2, 0) / (m.scores.length - 1)) : NaN
    return {
      side,
      ref: data.ref,
      commit: data.commit,
      trainRows: data.train.rows,
      holdoutRows: data.holdout.rows,
      evaluationRows: m.evaluationRows,
      referenceRows: m.referenceRows,
      features: data.train.features.map((f) => ({ name: f.name, kind: f.kind })),
      model: { kind: m.model.kind, description: `${m.model.kind} on ${m.model.featureNames.length} features` },
      scores: m.scores,
      scoreMean: meanScore,
      scoreSd: sd,
      refitSeeds: m.refitSeeds,
      noiseCovers: m.noiseCovers,
    }
  }
  return { base: describe('base', inputs.base, base), head: describe('head', inputs.head, head) }
}

function list(names: readonly string[]): string {
  return names.length <= 5 ? names.join(', ') : `${names.slice(0, 5).join(', ')} and ${names.length - 5} more`
}

function fmtPlain(v: number): string {
  return Number.isFinite(v) ? Number(v.toPrecision(3)).toString() : 'n/a'
}
