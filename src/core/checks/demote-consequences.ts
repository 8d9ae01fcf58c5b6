import type { Finding } from '../report/report.ts'

/**
 * When a leakage finding blocks, the other features' rank shifts, their prediction-sensitivity shifts
 * and the global ranking change are
 * mostly its consequence: a feature that takes over the model drains every other feature's
 * importance. They stay in the report, as info, saying so, so the comment leads with the cause.
 */
export function demoteConsequences(findings: readonly Finding[]): Finding[] {
  const leak = findings.find((f) => f.kind === 'leakage' && f.severity === 'block')
  if (!leak) return [...findings]
  return findings.map((f) =>
    ((f.kind === 'rank-shift' || f.kind === 'sensitivity-shift') && f.feature !== leak.feature) || f.kind === 'rank-agreement'
      ? {
          ...f,
          severity: f.severity === 'block' ? 'block' : 'info',
          message: `${f.message} Likely a consequence of the leakage finding on ${leak.feature}: a feature that takes over the model moves every other feature's importance.`,
        }
      : f,
  )
}
