/**
 * When a pull request adds a strong feature, every other feature's importance falls (the new one
 * takes part of the credit); when it removes one, the others rise. Those shifts are one fact, not
 * many: this module replaces the rank-shift findings that the redistribution explains with one
 * finding about the feature that caused them, and keeps a separate finding only for a shift it does
 * not explain.
 *
 * A feature is strong here when it is above the floor and holds at least `strongShare` of its side's
 * positive importance (10%, a rule of thumb of this project, not a published value). Under a pure
 * redistribution every feature on both sides keeps its importance up to one common factor, the
 * ratio of the shared features' total positive importance head / base. A rank-shift finding is
 * (or floor-drop) finding is explained when its feature moved in the direction of that factor, kept its place among the shared
 * features, and lies within `tolerance` of the proportional value: 2 pooled reseed SDs or 20% of it,
 * whichever is larger (again a rule of thumb). Everything else (a rank change, a feature gaining
 * while the new one takes credit, a move beyond the proportional one) keeps its own finding.
 *
 * The grouped finding takes the most severe severity of the findings it replaces and of the shifts
 * left standing (which such a feature usually causes too), so that the comment leads with the cause;
 * it never raises the verdict, since that severity is already in the report. After a blocking leak
 * those are info already (demoteConsequences).
 */
import { formatChange, formatNumber, formatPercent } from '../report/format-number.ts'
import type { Finding, Severity } from '../report/report.ts'
import type { FeatureSetChange } from './feature-set.ts'
import { positiveShare, type SideResult } from './side-result.ts'
import { pooledStandardDeviation } from '../statistics/pooled-standard-deviation.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

export const strongShare = 0.1
const toleranceSds = 2
const toleranceRelative = 0.2

const severityOrder: Readonly<Record<Severity, number>> = { block: 0, warn: 1, info: 2 }

export function groupConsequences(
  findings: readonly Finding[],
  sides: { readonly base: SideResult; readonly head: SideResult },
  featureSet: FeatureSetChange,
): Finding[] {
  const { base, head } = sides
  const unit = (side: SideResult, name: string) => side.importances.find((u) => !u.isGroup && u.name === name)
  const strong = (side: SideResult, names: readonly string[]) =>
    names
      .map((name) => ({ name, unit: unit(side, name), share: positiveShare(side.importances, name) }))
      .filter((x) => x.unit?.isAboveFloor && x.share >= strongShare)
  const added = strong(head, featureSet.added)
  const removed = strong(base, featureSet.removed)
  if (added.length === 0 && removed.length === 0) return [...findings]

  const headNames = new Set(head.importances.filter((u) => !u.isGroup).map((u) => u.name))
  const shared = base.importances.filter((u) => !u.isGroup && headNames.has(u.name))
  const total = (side: SideResult) =>
    shared.reduce((sum, b) => sum + Math.max(0, unit(side, b.name)!.mean), 0)
  const baseTotal = total(base)
  const headTotal = total(head)
  if (!(baseTotal > 0)) return [...findings]
  const factor = headTotal / baseTotal
  const order = (side: SideResult) =>
    new Map(
      rankByValue(
        shared.map((b) => unit(side, b.name)!),
        (u) => u.mean,
      ).map((u, i) => [u.name, i]),
    )
  const baseOrder = order(base)
  const headOrder = order(head)

  const explained: { finding: Finding; change: string }[] = []
  const kept: Finding[] = []
  for (const finding of findings) {
    const isShift = finding.kind === 'rank-shift' || finding.kind === 'floor-drop'
    const b = isShift && finding.feature !== undefined ? unit(base, finding.feature) : undefined
    const h = b ? unit(head, b.name) : undefined
    if (!b || !h || !baseOrder.has(b.name)) {
      kept.push(finding)
      continue
    }
    const expected = b.mean * factor
    const pooledSd = pooledStandardDeviation(b.refitSd, h.refitSd)
    const tolerance = Math.max(toleranceSds * pooledSd, toleranceRelative * Math.abs(expected))
    const sameDirection = Math.sign(h.mean - b.mean) === Math.sign(factor - 1)
    // Order among features at the floor on the head is noise (the rank-shift check compares none).
    const sameOrder = baseOrder.get(b.name) === headOrder.get(b.name) || !h.isAboveFloor
    if (sameDirection && sameOrder && Math.abs(h.mean - expected) <= tolerance) {
      explained.push({ finding, change: `${b.name} ${formatChange(b.mean, h.mean)}` })
    } else kept.push(finding)
  }
  // The shifts that usually follow such a feature, explained or not: the cause finding leads them.
  const consequences = kept.filter((f) => f.kind === 'rank-shift' || f.kind === 'rank-agreement' || f.kind === 'floor-drop')
  if (explained.length === 0 && !consequences.some((f) => f.severity !== 'info')) return [...findings]
  const features = [...new Map(explained.map((x) => [x.finding.feature!, x.change])).entries()]
  const atFloor = explained.filter((x) => x.finding.kind === 'floor-drop').length

  const severity = [...explained.map((x) => x.finding), ...consequences]
    .map((f) => f.severity)
    .reduce((worst, s) => (severityOrder[s] < severityOrder[worst] ? s : worst), 'info' as Severity)
  const count = `${features.length} ${features.length === 1 ? 'feature' : 'features'}`
  const cause = added.length > 0 ? added : removed
  const names = cause.map((x) => x.name).join(', ')
  const shares = cause.map((x) => formatPercent(x.share)).join(', ')
  const them = cause.length === 1 ? 'it' : 'them'
  const effect =
    features.length === 0
      ? `no other feature moved in proportion to ${them}`
      : added.length > 0
        ? `${count} lost share to ${them} in proportion`
        : `${count} gained ${cause.length === 1 ? 'its' : 'their'} share in proportion`
  const title =
    added.length > 0
      ? `${names}, new in this pull request, took ${shares} of the head model's importance; ${effect}.`
      : `${names}, removed in this pull request, held ${shares} of the base model's importance; ${effect}.`
  const message =
    `The shared features' total importance went from ${formatNumber(baseTotal)} to ${formatNumber(headTotal)} ` +
    `(${formatChange(baseTotal, headTotal)})` +
    (features.length === 0
      ? '. '
      : `, and these moved with it, each within ${toleranceSds} reseed SDs or ${formatPercent(toleranceRelative)} of its proportional value and in the same order: ` +
        `${features.map(([, change]) => change).join(', ')}. `) +
    (atFloor > 0 ? `${atFloor} of them fell to the noise floor on the way. ` : '') +
    (consequences.length > 0
      ? `${consequences.length} other ${consequences.length === 1 ? 'shift is' : 'shifts are'} not explained by the redistribution and ${consequences.length === 1 ? 'is' : 'are'} reported on ${consequences.length === 1 ? 'its' : 'their'} own.`
      : 'No other shift is reported.')
  const grouped: Finding = {
    kind: 'share-redistribution',
    severity,
    feature: cause[0].name,
    title,
    message,
    evidence: {
      cause: names,
      causeShare: cause[0].share,
      direction: added.length > 0 ? 'added' : 'removed',
      featuresExplained: features.length,
      fellToFloor: atFloor,
      sharedTotalBase: baseTotal,
      sharedTotalHead: headTotal,
      proportionalFactor: factor,
      explained: features.map(([name]) => name).join(', '),
    },
  }
  return [...kept, grouped]
}
