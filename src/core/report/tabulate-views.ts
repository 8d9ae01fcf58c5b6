/**
 * The views beside permutation importance as one compact table (prediction sensitivity on both
 * sides, on the unlabeled rows, and the built-in trees' gain), for the comment's collapsed section.
 */
import { formatNumber, formatPercent } from './format-number.ts'
import type { GateReport } from './report.ts'
import type { TextTable } from './tabulate-report.ts'

export function tabulateViews(report: GateReport): { readonly table: TextTable; readonly note: string } | null {
  const { sensitivity, gain } = report
  if (!sensitivity && !gain) return null
  const gainBy = new Map((gain?.features ?? []).map((f) => [f.name, f]))
  const names = sensitivity ? sensitivity.features.filter((f) => !f.isGroup).map((f) => f.name) : (gain?.features ?? []).map((f) => f.name)
  const byName = new Map((sensitivity?.features ?? []).filter((f) => !f.isGroup).map((f) => [f.name, f]))
  const binary = sensitivity?.threshold !== null && sensitivity?.threshold !== undefined
  const unlabeled = (sensitivity?.unlabeledRows.head ?? 0) > 0
  const header = [
    'feature',
    ...(sensitivity ? ['moves predictions (base → head)', ...(binary ? ['decisions flipped (head)'] : []), ...(unlabeled ? ['on unlabeled (head)'] : [])] : []),
    ...(gain ? ['gain rank (share), head'] : []),
  ]
  const rows = names.map((name) => {
    const s = byName.get(name)
    const g = gainBy.get(name)?.head
    const num = (v: number | undefined) => (v === undefined ? '—' : formatNumber(v))
    return [
      name,
      ...(sensitivity
        ? [
            `${num(s?.base?.holdout.mean)} → ${num(s?.head?.holdout.mean)}${s?.change?.isSignificant ? ' *' : ''}`,
            ...(binary ? [s?.head?.holdout.flipShare == null ? '—' : formatPercent(s.head.holdout.flipShare)] : []),
            ...(unlabeled ? [num(s?.head?.unlabeled?.mean)] : []),
          ]
        : []),
      ...(gain ? [g ? `${g.rank} (${formatPercent(g.share)})` : '—'] : []),
    ]
  })
  const notes = [
    ...(sensitivity
      ? [
          `"Moves predictions" is the mean absolute change of the model's output${binary ? ' (probability)' : ''} when the feature takes reference values (no labels needed); * marks a change beyond reseed noise.`,
        ]
      : []),
    ...(gain ? [gain.caution] : []),
  ]
  return { table: { header, align: header.map((_, i) => (i === 0 ? 'left' : 'right')), rows }, note: notes.join(' ') }
}
