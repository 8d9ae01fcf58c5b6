import type { GroupsCheckConfig } from '../config.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { DropColumnEstimate } from '../importance/drop-column-importance.ts'
import type { Finding } from '../report/report.ts'
import { formatNumber as fmt } from '../report/format-number.ts'
import type { SideResult } from './side-result.ts'

/**
 * "Carried by its correlated group": a group (automatic or from the policy) that matters, with
 * members that do not look like it alone. The group matters when its joint permutation importance
 * is above the noise floor, or when refitting without all its members at once (grouped drop-column,
 * LOCO) loses more than reseed noise. A member is carried when
 * - its own permutation importance is low: below half the group's when the group's permutation
 *   importance is above the floor, else not above the floor itself; or
 * - the group's drop-column loss is above reseed noise while the member's own drop-column loss
 *   (refitted without it alone) is not, however high its permutation importance.
 * Permuting or leaving out one of two near-copies leaves the other to carry the signal, so each
 * looks unimportant alone while together they matter (Hooker, Mentch & Zhou 2021, Statistics and
 * Computing 31; Lei et al. 2018 for LOCO; the one-half rule is ours, common practice in spirit): a
 * redundant new feature must not look harmless, nor a correlated pair unimportant. Severity: the
 * policy's action (info by default).
 */
export function checkGroupCarried(
  head: Pick<SideResult, 'importances' | 'dropColumns' | 'dropGroups'>,
  touched: ReadonlySet<string>,
  options: GroupsCheckConfig,
): Finding[] {
  const action = options.action
  if (action === 'off') return []
  const byName = new Map(head.importances.filter((u) => !u.isGroup).map((u) => [u.name, u]))
  const findings: Finding[] = []
  for (const group of head.importances.filter((u) => u.isGroup)) {
    const drop = head.dropGroups?.[group.name]
    const byPermutation = group.isAboveFloor && group.mean > 0
    const byDropColumn = drop?.isAboveNoise === true
    if (!byPermutation && !byDropColumn) continue
    const members = group.members.map((m) => byName.get(m)).filter((u): u is FlooredImportance => u !== undefined)
    const ownDrop = (u: FlooredImportance): DropColumnEstimate | undefined => head.dropColumns?.[u.name]
    const lowAlone = (u: FlooredImportance) => (byPermutation ? u.mean < group.mean / 2 : !u.isAboveFloor)
    const recoverable = (u: FlooredImportance) => byDropColumn && ownDrop(u) !== undefined && !ownDrop(u)!.isAboveNoise
    const carried = members.filter((u) => lowAlone(u) || recoverable(u))
    if (carried.length === 0) continue
    const names = carried.map((u) => u.name)
    const plural = names.length > 1
    const newOnes = names.filter((n) => touched.has(n))
    const dropped = carried.filter((u) => ownDrop(u) !== undefined)
    const together = [
      `Permuted together, ${group.members.join(', ')} change the score by ${fmt(group.mean)} (95% interval [${fmt(group.lower)}, ${fmt(group.upper)}])`,
      ...(drop ? [`refitted without all of them, the holdout loss grows by ${fmt(drop.mean)} (95% interval [${fmt(drop.lower)}, ${fmt(drop.upper)}]${drop.isAboveNoise ? '' : ', within reseed noise'})`] : []),
    ]
    const alone = [
      `permuted alone, ${carried.map((u) => `${u.name} by ${fmt(u.mean)}`).join(', ')}`,
      ...(dropped.length > 0
        ? [`refitted without one at a time, ${dropped.map((u) => `${u.name} by ${fmt(ownDrop(u)!.mean)}${ownDrop(u)!.isAboveNoise ? '' : ' (within reseed noise)'}`).join(', ')}`]
        : []),
    ]
    findings.push({
      kind: 'group-carried',
      severity: action,
      feature: names[0],
      title: `${names.join(' and ')} ${plural ? 'are' : 'is'} carried by ${plural ? 'their' : 'its'} correlated group: ${group.members.join(', ')}.`,
      message:
        `${together.join('; ')}; ${alone.join('; ')}: the other members stand in for ${plural ? 'them' : 'it'} when ${plural ? 'they are' : 'it is'} permuted or left out. ` +
        (newOnes.length > 0 ? `${newOnes.join(', ')} ${newOnes.length > 1 ? 'are' : 'is'} new or changed here: redundant with the rest of the group, not harmless. ` : '') +
        'Judge the group as one.',
      evidence: {
        group: group.name,
        groupMean: group.mean,
        groupLower: group.lower,
        lowestMemberMean: Math.min(...carried.map((u) => u.mean)),
        touched: newOnes.length > 0,
        groupDropColumnLoss: drop ? finite(drop.mean) : null,
        groupDropColumnAboveNoise: drop ? drop.isAboveNoise : null,
        membersDropColumnWithinNoise: dropped.filter((u) => !ownDrop(u)!.isAboveNoise).length,
      },
    })
  }
  return findings
}

function finite(x: number): number | null {
  return Number.isFinite(x) ? x : null
}
