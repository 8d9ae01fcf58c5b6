import type { GroupsCheckConfig } from '../config.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { Finding } from '../report/report.ts'
import { formatNumber as fmt } from '../report/format-number.ts'

/**
 * "Carried by its correlated group": a group (automatic or from the policy) whose joint permutation
 * importance is above the noise floor, with members whose own importance is below half the group's.
 * Permuting one of two near-copies leaves the other to carry the signal, so each looks unimportant
 * alone while together they matter (Hooker, Mentch & Zhou 2021, Statistics and Computing 31; the
 * one-half rule is ours, common practice in spirit): a redundant new feature must not look harmless,
 * nor a correlated pair unimportant. Severity: the policy's action (info by default).
 */
export function checkGroupCarried(importances: readonly FlooredImportance[], touched: ReadonlySet<string>, options: GroupsCheckConfig): Finding[] {
  const action = options.action
  if (action === 'off') return []
  const byName = new Map(importances.filter((u) => !u.isGroup).map((u) => [u.name, u]))
  const findings: Finding[] = []
  for (const group of importances.filter((u) => u.isGroup && u.isAboveFloor && u.mean > 0)) {
    const members = group.members.map((m) => byName.get(m)).filter((u): u is FlooredImportance => u !== undefined)
    const low = members.filter((u) => u.mean < group.mean / 2)
    if (low.length === 0) continue
    const names = low.map((u) => u.name)
    const newOnes = names.filter((n) => touched.has(n))
    findings.push({
      kind: 'group-carried',
      severity: action,
      feature: names[0],
      title: `${names.join(' and ')} ${names.length > 1 ? 'are' : 'is'} carried by ${names.length > 1 ? 'their' : 'its'} correlated group: ${group.members.join(', ')}.`,
      message:
        `Permuted together, ${group.members.join(', ')} change the score by ${fmt(group.mean)} (95% interval [${fmt(group.lower)}, ${fmt(group.upper)}]); ` +
        `alone, ${low.map((u) => `${u.name} by ${fmt(u.mean)}`).join(', ')}: the other members stand in for ${names.length > 1 ? 'them' : 'it'} when ${names.length > 1 ? 'they are' : 'it is'} permuted. ` +
        (newOnes.length > 0 ? `${newOnes.join(', ')} ${newOnes.length > 1 ? 'are' : 'is'} new or changed here: redundant with the rest of the group, not harmless. ` : '') +
        'Judge the group as one.',
      evidence: { group: group.name, groupMean: group.mean, groupLower: group.lower, lowestMemberMean: Math.min(...low.map((u) => u.mean)), touched: newOnes.length > 0 },
    })
  }
  return findings
}
