import type { Finding, Severity, Verdict } from '../report/report.ts'
import { pooledStandardDeviation } from '../statistics/pooled-standard-deviation.ts'

const order: Record<Severity, number> = { block: 0, warn: 1, info: 2 }

/** Findings sorted block, warn, info; within a severity, the order they came in (renderers keep the report's order). */
export function sortFindings(findings: readonly Finding[]): Finding[] {
  return findings
    .map((finding, index) => ({ finding, index }))
    .sort((a, b) => order[a.finding.severity] - order[b.finding.severity] || a.index - b.index)
    .map((x) => x.finding)
}

/** What the pull request changed, for ordering: added, removed and changed (other values) features. */
export interface ChangedFeatures {
  readonly added: readonly string[]
  readonly removed: readonly string[]
  readonly changed: Iterable<string>
}

/** Within one severity and one closeness to the change: the cause before its effects. */
const kindOrder: Readonly<Record<Finding['kind'], number>> = {
  'run-error': 0,
  leakage: 1,
  'holdout-rows': 2,
  'score-regression': 3,
  'share-redistribution': 4,
  'slice-dominance': 5,
  'slice-score': 6,
  'rank-shift': 7,
  'rank-agreement': 8,
  'sensitivity-shift': 9,
  'sensitivity-unlabeled': 10,
  'gain-noise': 11,
  'group-carried': 12,
  'floor-drop': 13,
  'unused-feature': 14,
  'slice-top-features': 15,
  'slice-too-small': 16,
  'feature-set': 17,
  'policy-changed': 18,
  'noise-model': 19,
}

/** How strong a finding's evidence is, in its kind's own unit (larger first); 0 when unknown. */
function strength(finding: Finding): number {
  const e = finding.evidence
  const num = (key: string) => (typeof e[key] === 'number' && Number.isFinite(e[key]) ? (e[key] as number) : 0)
  switch (finding.kind) {
    case 'leakage':
      return Math.max(num('singleFeatureSeparation'), num('sliceSeparation'), num('share'))
    case 'score-regression':
      return num('worseningInReseedSds')
    case 'share-redistribution':
      return num('causeShare')
    case 'rank-shift': {
      const sd = pooledStandardDeviation(num('baseRefitSd'), num('headRefitSd'))
      const difference = Math.abs(num('headMean') - num('baseMean'))
      return sd > 0 ? difference / sd : difference > 0 ? Infinity : 0
    }
    case 'rank-agreement':
      return num('kendallTauThreshold') - num('kendallTau')
    default:
      return 0
  }
}

/**
 * The report's order: block, warn, info; within a severity, findings about a feature the pull
 * request added, removed or changed (and the feature-set finding itself) first; then the cause
 * before its effects (leakage, holdout rows, score, redistribution, shifts, ranking, floor, the
 * rest); then by strength of evidence, largest first; then the checks' order. Never column order.
 */
export function orderFindings(findings: readonly Finding[], change: ChangedFeatures): Finding[] {
  const touched = new Set([...change.added, ...change.removed, ...change.changed])
  const isAboutChange = (f: Finding) => f.kind === 'feature-set' || (f.feature !== undefined && touched.has(f.feature))
  return findings
    .map((finding, index) => ({ finding, index, about: isAboutChange(finding) ? 0 : 1, strength: strength(finding) }))
    .sort(
      (a, b) =>
        order[a.finding.severity] - order[b.finding.severity] ||
        a.about - b.about ||
        (kindOrder[a.finding.kind] ?? 99) - (kindOrder[b.finding.kind] ?? 99) ||
        b.strength - a.strength ||
        a.index - b.index,
    )
    .map((x) => x.finding)
}

/**
 * The verdict: block if any finding blocks, else warn if any warns, else pass. ('error' is decided
 * by the adapter when the run itself failed: an error is never a pass.)
 */
export function decideVerdict(findings: readonly Finding[]): Exclude<Verdict, 'error'> {
  if (findings.some((f) => f.severity === 'block')) return 'block'
  if (findings.some((f) => f.severity === 'warn')) return 'warn'
  return 'pass'
}

/** One sentence: the verdict and its main reason (the first finding of the deciding severity). */
export function writeHeadline(verdict: Exclude<Verdict, 'error'>, findings: readonly Finding[]): string {
  const sorted = sortFindings(findings)
  const deciding = sorted.filter((f) => f.severity === verdict)
  const more = deciding.length > 1 ? ` (and ${deciding.length - 1} more ${verdict === 'block' ? 'blocking' : 'warning'} finding${deciding.length > 2 ? 's' : ''})` : ''
  if (verdict === 'pass') {
    return 'Passed: no leakage-like dominance, rank shift or score regression beyond reseed noise was found.'
  }
  const title = lowerFirst(deciding[0].title)
  const reason = more ? `${title.replace(/\.$/, '')}${more}.` : title
  return verdict === 'block' ? `Blocked: ${reason}` : `Passed with warnings: ${reason}`
}

function lowerFirst(text: string): string {
  // Feature names keep their case; only a leading capitalised common word is lowered.
  return /^(The|Holdout|A|An)\b/.test(text) ? text[0].toLowerCase() + text.slice(1) : text
}
