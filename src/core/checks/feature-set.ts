/**
 * The change a pull request makes to the features: which columns it adds, removes or re-types
 * (diffFeatureSets), which shared columns now hold other values (changedFeatures, whose answer
 * decides whether a leak-like feature blocks or only warns), and the findings that describe it.
 */
import type { Dataset } from '../data/dataset.ts'
import type { Finding, GateReport } from '../report/report.ts'
import { formatNumber } from '../report/format-number.ts'
import type { SideResult } from './side-result.ts'

export type FeatureSetChange = GateReport['featureSet']

/** The part of a side that change detection reads. */
export interface SideData {
  readonly train: Dataset
  readonly holdout: Dataset
}

/** Features by column name: added by the head, removed from the base, or of another kind (numeric / categorical). */
export function diffFeatureSets(base: Dataset, head: Dataset): FeatureSetChange {
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
export function changedFeatures(base: SideData, head: SideData): Set<string> {
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

/**
 * What the pull request did to the feature set, as info findings: one naming the added, removed and
 * re-typed features, and one for each added feature the candidate does not measurably use (its
 * interval does not lie above zero).
 */
export function featureSetFindings(featureSet: FeatureSetChange, head: SideResult): Finding[] {
  const findings: Finding[] = []
  const { added, removed, kindChanged } = featureSet
  if ((added.length || removed.length || kindChanged.length)) {
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
        message: `Its importance ${formatNumber(unit.mean)} has a 95% interval [${formatNumber(unit.lower)}, ${formatNumber(unit.upper)}] that does not lie above zero.`,
        evidence: { mean: unit.mean, lower: unit.lower, upper: unit.upper },
      })
    }
  }
  return findings
}

function list(names: readonly string[]): string {
  return names.length <= 5 ? names.join(', ') : `${names.slice(0, 5).join(', ')} and ${names.length - 5} more`
}
