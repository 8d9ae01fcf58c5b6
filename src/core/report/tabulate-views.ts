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
  const multiclass = sensitivity?.decision === 'most-probable-class'
  const binary = (sensitivity?.threshold !== null && sensitivity?.threshold !== undefined) || multiclass
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
          `"Moves predictions" is the mean absolute change of the model's output${multiclass ? ' (class probabilities: half the sum over classes of their absolute changes)' : binary ? ' (probability)' : ''} when the feature takes reference values (no labels needed); * marks a change beyond reseed noise.` +
            (multiclass ? ' A decision flips when the most probable class changes.' : ''),
        ]
      : []),
    ...(gain ? [gain.caution] : []),
    ...((automatic) => (automatic.length > 0 ? [`Correlated groups (permuted jointly): ${automatic.map((g) => `${g.members.join(', ')} (|Spearman| ≥ ${formatNumber(g.weakestLink ?? NaN)})`).join('; ')}.`] : []))(
      (report.groups ?? []).filter((g) => g.automatic),
    ),
  ]
  return { table: { header, align: header.map((_, i) => (i === 0 ? 'left' : 'right')), rows }, note: notes.join(' ') }
}

/** The policy's slices as one compact table: rows, score per side, top feature on the head. */
export function tabulateSlices(report: GateReport): TextTable | null {
  if (!report.slices || report.slices.length === 0) return null
  const worse = new Set(report.findings.filter((f) => f.kind === 'slice-score').map((f) => f.feature))
  const header = ['slice', 'rows (head)', `${report.settings.metric} base → head`, 'top feature (head)']
  const rows = report.slices.map((s) => [
    `${s.name}: ${s.definition}`,
    `${s.rows.head}${s.status === 'measured' ? '' : s.status === 'too-small' ? ' (too small)' : ' (one class)'}`,
    s.base || s.head
      ? `${s.base ? formatNumber(s.base.scoreMean) : '—'} → ${s.head ? formatNumber(s.head.scoreMean) : '—'}${worse.has(s.name) ? ' *' : ''}`
      : '—',
    s.head?.top[0] ? `${s.head.top[0].name} (${formatPercent(s.head.top[0].share)})` : '—',
  ])
  return { header, align: ['left', 'right', 'right', 'left'], rows }
}
