/**
 * The comment's chart: a mermaid xychart (GitHub renders ```mermaid blocks in comments) of the top
 * features' importance, head as bars and base as a line, so the two sides show on one axis without
 * a legend (xychart has none; the title says which is which). Where mermaid does not render, the
 * block reads as text and the feature table beside it carries the same numbers.
 *
 * Labels are reduced to letters, digits and `_ . : / -` and cut to 24 characters: nothing from a
 * report can end the fence, the quoted string or the chart.
 */
import type { GateReport } from './report.ts'

/** How many features the chart shows at most. */
export const chartFeatures = 8

function label(name: string): string {
  const safe = name.replace(/[^A-Za-z0-9_.:/ -]/g, '?').replace(/\s+/g, ' ').trim() || '?'
  return safe.length > 24 ? `${safe.slice(0, 23)}…` : safe
}

/** Plain decimal for mermaid's number parser (no exponent, no grouping). */
function value(v: number): string {
  if (!Number.isFinite(v)) return '0'
  const fixed = v.toFixed(6).replace(/0+$/, '').replace(/\.$/, '')
  return fixed === '-0' ? '0' : fixed
}

/**
 * The chart's source without the fence, or null when fewer than two features were measured. Top
 * features by the larger of their two means; a side without the feature draws 0 there, and the
 * label says "(new)" or "(removed)" so the 0 is not read as a measurement.
 */
export function mermaidChart(report: GateReport): string | null {
  const rows = report.features
    .filter((row) => !row.isGroup)
    .map((row) => ({ row, size: Math.max(row.base?.mean ?? -Infinity, row.head?.mean ?? -Infinity) }))
    .sort((a, b) => b.size - a.size)
    .slice(0, chartFeatures)
    .map((x) => x.row)
  if (rows.length < 2) return null
  const names = rows.map((row) => {
    const suffix = row.presence === 'added' ? ' (new)' : row.presence === 'removed' ? ' (removed)' : ''
    return `"${label(row.name)}${suffix}"`
  })
  const head = rows.map((row) => row.head?.mean ?? 0)
  const base = rows.map((row) => row.base?.mean ?? 0)
  const all = [...head, ...base]
  const top = Math.max(...all)
  const low = Math.min(0, ...all)
  const metric = label(report.settings.metric || 'metric')
  return [
    'xychart-beta horizontal',
    `  title "Importance (bars: head, line: base), top ${rows.length}"`,
    `  x-axis [${names.join(', ')}]`,
    `  y-axis "${metric} worsening" ${value(low)} --> ${value(top > low ? top * 1.05 : low + 1)}`,
    `  bar [${head.map(value).join(', ')}]`,
    `  line [${base.map(value).join(', ')}]`,
  ].join('\n')
}
