import type { Finding } from '../report/report.ts'
import type { CheckAction } from './check-action.ts'

export interface HoldoutIdentity {
  readonly source: string
  readonly rows: number
  readonly ids?: readonly string[]
  readonly idName?: string
  readonly target: Float64Array
}

/**
 * The two sides must be scored on the same holdout rows, or a score or importance difference may be
 * nothing but a different sample. Same count, and then the same ids in the same order where an id
 * column exists, and then the same label under each id (a relabelled row is a changed holdout);
 * without ids, the same target values row by row (a weaker check, said in the message).
 */
export function checkHoldoutRows(base: HoldoutIdentity, head: HoldoutIdentity, action: CheckAction): Finding[] {
  if (action === 'off') return []
  const problem = describeDifference(base, head)
  if (!problem) return []
  return [
    {
      kind: 'holdout-rows',
      severity: action,
      title: `The two sides are not scored on the same holdout rows: ${problem.short}.`,
      message:
        `${problem.long} Score and importance differences between the sides would then mix the change with a different sample. ` +
        `Keep the holdout fixed in the pull request (or split by an id column with data.split.by), then rerun.`,
      evidence: { baseRows: base.rows, headRows: head.rows, ...problem.evidence },
    },
  ]
}

function describeDifference(
  base: HoldoutIdentity,
  head: HoldoutIdentity,
): { short: string; long: string; evidence: Record<string, number> } | null {
  if (base.rows !== head.rows) {
    return {
      short: `${base.rows} rows on the base side, ${head.rows} on the head`,
      long: `The base holdout (${base.source}) has ${base.rows} rows and the head holdout (${head.source}) has ${head.rows}.`,
      evidence: {},
    }
  }
  if (base.ids && head.ids) {
    let differing = 0
    let first = -1
    for (let i = 0; i < base.rows; i++) {
      if (base.ids[i] !== head.ids[i]) {
        differing++
        if (first < 0) first = i
      }
    }
    if (differing === 0) return describeLabelChange(base, head)
    const baseSet = new Set(base.ids)
    const onlyHead = head.ids.filter((id) => !baseSet.has(id)).length
    return {
      short: `${differing} of ${base.rows} ids differ by position (${onlyHead} ${onlyHead === 1 ? 'id' : 'ids'} only on the head)`,
      long:
        `Holdout row ${first + 1} has ${base.idName ?? 'id'} '${base.ids[first]}' on the base side and '${head.ids[first]}' on the head; ` +
        `${differing} of ${base.rows} rows differ by position and ${onlyHead} head ${onlyHead === 1 ? 'id does' : 'ids do'} not occur on the base side.`,
      evidence: { differingRows: differing, idsOnlyOnHead: onlyHead, firstDifferingRow: first + 1 },
    }
  }
  const { differing, first } = differingTargets(base, head)
  if (differing === 0) return null
  return {
    short: `the target differs in ${differing} of ${base.rows} rows`,
    long:
      `Without an id column only the target can be compared row by row; it differs in ${differing} of ${base.rows} rows ` +
      `(first at holdout row ${first + 1}).`,
    evidence: { differingRows: differing, firstDifferingRow: first + 1 },
  }
}

/** Same ids in the same order: the labels must match too. */
function describeLabelChange(base: HoldoutIdentity, head: HoldoutIdentity): { short: string; long: string; evidence: Record<string, number> } | null {
  const { differing, first } = differingTargets(base, head)
  if (differing === 0) return null
  return {
    short: `the same ids carry another label in ${differing} of ${base.rows} rows`,
    long:
      `The ids match row by row, but the target differs in ${differing} of ${base.rows} rows ` +
      `(first at holdout row ${first + 1}, ${base.idName ?? 'id'} '${base.ids![first]}'): the pull request relabelled the holdout.`,
    evidence: { relabelledRows: differing, firstDifferingRow: first + 1 },
  }
}

/** Rows whose target differs between the sides (NaN equal to NaN), and the first of them (-1 for none). */
function differingTargets(base: HoldoutIdentity, head: HoldoutIdentity): { differing: number; first: number } {
  let differing = 0
  let first = -1
  for (let i = 0; i < base.rows; i++) {
    const a = base.target[i]
    const b = head.target[i]
    if (a !== b && !(Number.isNaN(a) && Number.isNaN(b))) {
      differing++
      if (first < 0) first = i
    }
  }
  return { differing, first }
}
