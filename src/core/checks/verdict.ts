import type { Finding, Severity, Verdict } from '../report/report.ts'

const order: Record<Severity, number> = { block: 0, warn: 1, info: 2 }

/** Findings sorted block, warn, info; within a severity, the order the checks produced them. */
export function sortFindings(findings: readonly Finding[]): Finding[] {
  return findings
    .map((finding, index) => ({ finding, index }))
    .sort((a, b) => order[a.finding.severity] - order[b.finding.severity] || a.index - b.index)
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
