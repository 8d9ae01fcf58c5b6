/**
 * The HTML report: one self-contained file (inline CSS and SVG, no script, no fonts, images or
 * links to fetch), readable in any browser, printable, light or dark by the reader's setting.
 *
 * Sections: the verdict, headline and holdout score; the findings with their evidence in words;
 * importance per feature for both sides with 95% whiskers and the reseed floor as a band around
 * zero (the half-width of the interval: a mark outside the band is above the floor); a rank chart
 * joining each feature's base and head rank (shifts beyond noise drawn heavy, features at the floor
 * on both sides greyed); the reseed null of rank agreement as dot strips with the observed value
 * marked; per-refit holdout scores per side as dot strips; drop-column results when the report has
 * them; then the tables the comment collapses.
 *
 * Each chart row is an HTML name beside an SVG whose x positions are percentages, so the marks keep
 * their shape at any width and names wrap instead of being cut. Base is a hollow circle in blue,
 * head a filled square in vermillion (Okabe & Ito 2008 palette, told apart by shape as well as
 * colour). Every string from the report goes through escapeHtml.
 */
import { escapeHtml } from './escape.ts'
import { formatCount, formatNumber } from './format-number.ts'
import type { FeatureRow, GateReport, RankAgreement, SideSummary } from './report.ts'
import { reportCaution } from './report.ts'
import { limitRows, noVerdictStatement, readDropColumn, tabulateReport, type TextTable } from './tabulate-report.ts'

export interface HtmlOptions {
  /** Feature rows drawn in each chart before "N more" (the tables keep all); default 300. */
  readonly maxChartRows?: number
}

const e = escapeHtml

/** A name with break opportunities after `_ . - /`, so a narrow column wraps between its parts. */
function nameHtml(name: string): string {
  return e(name).replace(/([_./-])(?=[^\s])/g, '$1<wbr>')
}

const style = `
:root { color-scheme: light dark; --fg: #1b1b1b; --bg: #ffffff; --muted: #5d5d5d; --rule: #c9c9c9;
  --band: #e4e4e4; --base: #0072b2; --head: #d55e00; --emph: #cc79a7; --grey: #9a9a9a;
  --block: #d55e00; --warn: #b8860b; --pass: #009e73; --info: #0072b2; }
@media (prefers-color-scheme: dark) {
  :root { --fg: #ececec; --bg: #161616; --muted: #b0b0b0; --rule: #444; --band: #333;
    --base: #56b4e9; --head: #f0a35e; --emph: #e3a6c9; --grey: #7a7a7a;
    --block: #f08a4b; --warn: #f0e442; --pass: #3fc39a; --info: #56b4e9; }
}
* { box-sizing: border-box; }
body { margin: 0 auto; padding: 16px; max-width: 1100px; font: 15px/1.45 system-ui, sans-serif; color: var(--fg); background: var(--bg); }
h1 { font-size: 1.35em; margin: 0 0 4px; } h2 { font-size: 1.1em; margin: 28px 0 8px; border-bottom: 1px solid var(--rule); padding-bottom: 2px; }
p, li, dd, dt, td, th, .name { overflow-wrap: anywhere; }
.verdict { display: inline-block; padding: 1px 8px; border: 2px solid currentColor; border-radius: 3px; font-weight: 700; letter-spacing: .04em; }
.v-block { color: var(--block); } .v-warn { color: var(--warn); } .v-pass { color: var(--pass); } .v-error { color: var(--block); }
.muted, .note { color: var(--muted); font-size: .92em; }
.finding { border-left: 5px solid var(--rule); padding: 4px 10px; margin: 10px 0; break-inside: avoid; }
.finding.s-block { border-color: var(--block); } .finding.s-warn { border-color: var(--warn); } .finding.s-info { border-color: var(--info); border-left-style: dotted; }
.finding h3 { font-size: 1em; margin: 0; } .finding p { margin: 4px 0; }
.sev { font-weight: 700; text-transform: uppercase; font-size: .8em; margin-right: 6px; }
dl.evidence { display: grid; grid-template-columns: minmax(8em, max-content) 1fr; gap: 0 12px; margin: 4px 0; font-size: .9em; }
dl.evidence dt { color: var(--muted); } dl.evidence dd { margin: 0; font-variant-numeric: tabular-nums; }
.legend { display: flex; flex-wrap: wrap; gap: 4px 16px; font-size: .9em; color: var(--muted); margin: 4px 0 8px; }
.legend svg { vertical-align: middle; }
.chart { display: grid; grid-template-columns: minmax(6em, 28%) 1fr; gap: 2px 10px; align-items: center; }
.chart .name { font-size: .9em; text-align: right; }
.chart svg { width: 100%; display: block; overflow: visible; }
.axis text, svg text { font-size: 11px; fill: var(--muted); }
.band { fill: var(--band); } .zero { stroke: var(--muted); stroke-width: 1; }
.whisker { stroke-width: 1.5; } .whisker.base, .mark.base { stroke: var(--base); } .whisker.head { stroke: var(--head); }
.mark.base { fill: var(--bg); stroke-width: 2; } .mark.head { fill: var(--head); }
.floorish .name { color: var(--grey); } .floorish .mark.head { fill: var(--grey); } .floorish .mark.base { stroke: var(--grey); } .floorish .whisker { stroke: var(--grey); }
.join { stroke: var(--grey); stroke-width: 1.5; } .join.shifted { stroke: var(--emph); stroke-width: 4; }
.null { fill: var(--grey); } .observed { stroke: var(--head); stroke-width: 3; } .threshold { stroke: var(--muted); stroke-dasharray: 4 3; }
.dot.base { fill: none; stroke: var(--base); stroke-width: 2; } .dot.head { fill: var(--head); }
.drop { fill: var(--emph); } .whisker.drop { stroke: var(--emph); }
.tables { overflow-x: auto; }
table { border-collapse: collapse; font-size: .88em; margin: 6px 0 14px; }
th, td { border-bottom: 1px solid var(--rule); padding: 3px 8px; vertical-align: top; }
td.r, th.r { text-align: right; font-variant-numeric: tabular-nums; }
footer { margin-top: 28px; color: var(--muted); font-size: .9em; }
@media (max-width: 600px) { body { padding: 10px; font-size: 14px; } .chart { grid-template-columns: minmax(5em, 36%) 1fr; } dl.evidence { grid-template-columns: 1fr; } dl.evidence dd { margin-bottom: 4px; } }
@media print { :root { --fg: #000; --bg: #fff; --muted: #333; --band: #e8e8e8; } body { max-width: none; } h2 { break-after: avoid; } .chart > * { break-inside: avoid; } }
`

interface Scale {
  readonly low: number
  readonly high: number
}

function scaleOf(values: readonly number[]): Scale {
  const finite = values.filter(Number.isFinite)
  let low = Math.min(0, ...finite)
  let high = Math.max(0, ...finite)
  if (!(high > low)) high = low + 1
  const pad = (high - low) * 0.04
  low -= low < 0 ? pad : 0
  high += pad
  return { low, high }
}

/** A value as a percentage position on the scale, clamped, with 2 decimals. */
function at(scale: Scale, value: number): string {
  const p = ((value - scale.low) / (scale.high - scale.low)) * 100
  return `${Math.min(100, Math.max(0, Number.isFinite(p) ? p : 0)).toFixed(2)}%`
}

/** Tick labels below a chart: low, zero (when inside), high; edge labels anchored inward. */
function axis(scale: Scale, label: string): string {
  // Zero gets a label of its own only away from the ends, where it would run into theirs.
  const zeroAt = (0 - scale.low) / (scale.high - scale.low)
  const ticks = [scale.low, ...(zeroAt > 0.3 && zeroAt < 0.7 ? [0] : []), scale.high]
  const texts = ticks.map((value, i) => {
    const anchor = i === 0 ? 'start' : i === ticks.length - 1 ? 'end' : 'middle'
    return `<text x="${at(scale, value)}" y="12" text-anchor="${anchor}">${e(formatNumber(Number(value.toPrecision(3))))}</text>`
  })
  return `<div class="name muted">${e(label)}</div><svg class="axis" height="16" role="img" aria-label="${e(label)} axis">${texts.join('')}</svg>`
}

function whisker(scale: Scale, side: 'base' | 'head', y: number, lower: number, upper: number): string {
  return `<line class="whisker ${side}" x1="${at(scale, lower)}" x2="${at(scale, upper)}" y1="${y}" y2="${y}"/>`
}

function mark(scale: Scale, side: 'base' | 'head', y: number, value: number, title: string): string {
  const tip = `<title>${e(title)}</title>`
  return side === 'base'
    ? `<circle class="mark base" cx="${at(scale, value)}" cy="${y}" r="4.5">${tip}</circle>`
    : `<svg x="${at(scale, value)}" y="${y - 5}" width="1" height="1" overflow="visible"><rect class="mark head" x="-5" y="0" width="10" height="10">${tip}</rect></svg>`
}

function legend(): string {
  return (
    '<div class="legend">' +
    '<span><svg width="14" height="14"><circle class="mark base" cx="7" cy="7" r="4.5"/></svg> base</span>' +
    '<span><svg width="14" height="14"><rect class="mark head" x="2" y="2" width="10" height="10"/></svg> head</span>' +
    '<span><svg width="22" height="14"><rect class="band" x="0" y="2" width="22" height="10"/></svg> reseed floor (a mark inside the band is indistinguishable from zero)</span>' +
    '<span>lines: 95% interval</span></div>'
  )
}

function isAtFloor(row: FeatureRow): boolean {
  return !(row.base?.isAboveFloor ?? false) && !(row.head?.isAboveFloor ?? false)
}

function limitNote(total: number, shown: number): string {
  return total > shown ? `<p class="note">${formatCount(total - shown)} more features are in the table below.</p>` : ''
}

function importanceChart(report: GateReport, maxRows: number): string {
  const rows = report.features.slice(0, maxRows)
  if (rows.length === 0) return '<p>No features were measured.</p>'
  const scale = scaleOf(rows.flatMap((row) => [row.base?.lower, row.base?.upper, row.head?.lower, row.head?.upper].filter((v): v is number => v !== undefined)))
  const cells = rows.map((row) => {
    const parts: string[] = []
    const sides = [['base', row.base, 8], ['head', row.head, 22]] as const
    for (const [side, stats, y] of sides) {
      if (!stats) continue
      const half = Math.max(0, stats.upper - stats.mean)
      parts.push(`<rect class="band" x="${at(scale, -half)}" y="${y - 6}" width="${widthBetween(scale, -half, half)}" height="12"/>`)
    }
    parts.push(`<line class="zero" x1="${at(scale, 0)}" x2="${at(scale, 0)}" y1="0" y2="30"/>`)
    for (const [side, stats, y] of sides) {
      if (!stats) continue
      const title = `${row.name}, ${side}: ${formatNumber(stats.mean)} [${formatNumber(stats.lower)}, ${formatNumber(stats.upper)}], rank ${stats.rank}${stats.isAboveFloor ? '' : ', indistinguishable from zero'}`
      parts.push(whisker(scale, side, y, stats.lower, stats.upper), mark(scale, side, y, stats.mean, title))
    }
    const presence = row.presence === 'added' ? ' (new)' : row.presence === 'removed' ? ' (removed)' : ''
    const label = `${row.name}${row.isGroup ? ' (group)' : ''}${presence}`
    return (
      `<div class="name${isAtFloor(row) ? ' floorish' : ''}" data-feature="${e(row.name)}">${nameHtml(label)}</div>` +
      `<svg class="${isAtFloor(row) ? 'floorish' : ''}" height="30" data-feature="${e(row.name)}" role="img" aria-label="${e(label)} importance">${parts.join('')}</svg>`
    )
  })
  return `${legend()}<div class="chart">${cells.join('')}${axis(scale, `${report.settings.metric} worsening`)}</div>${limitNote(report.features.length, rows.length)}`
}

function widthBetween(scale: Scale, from: number, to: number): string {
  const a = Number.parseFloat(at(scale, from))
  const b = Number.parseFloat(at(scale, to))
  return `${Math.max(0, b - a).toFixed(2)}%`
}

/** Each feature's base rank joined to its head rank on one rank axis (1 at the left). */
function rankChart(report: GateReport, maxRows: number): string {
  const rows = report.features.filter((row) => !row.isGroup).slice(0, maxRows)
  if (rows.length === 0) return '<p>No features were measured.</p>'
  const most = Math.max(...rows.map((row) => Math.max(row.base?.rank ?? 0, row.head?.rank ?? 0)))
  const scale: Scale = { low: 0.5, high: Math.max(1.5, most + 0.5) }
  const cells = rows.map((row) => {
    const parts: string[] = []
    const shifted = row.shift?.isSignificant === true && row.base?.rank !== row.head?.rank
    if (row.base && row.head) {
      parts.push(`<line class="join${shifted ? ' shifted' : ''}" x1="${at(scale, row.base.rank)}" x2="${at(scale, row.head.rank)}" y1="12" y2="12"/>`)
    }
    if (row.base) parts.push(mark(scale, 'base', 12, row.base.rank, `${row.name}: base rank ${row.base.rank}`))
    if (row.head) parts.push(mark(scale, 'head', 12, row.head.rank, `${row.name}: head rank ${row.head.rank}`))
    const ranks = `${row.base?.rank ?? 'none'} → ${row.head?.rank ?? 'none'}`
    const cls = isAtFloor(row) ? 'floorish' : ''
    return (
      `<div class="name ${cls}" data-feature="${e(row.name)}">${nameHtml(row.name)} <span class="muted">${e(ranks)}${shifted ? ', shifted' : ''}</span></div>` +
      `<svg class="${cls}" height="24" data-feature="${e(row.name)}" role="img" aria-label="${e(row.name)} rank ${e(ranks)}">${parts.join('')}</svg>`
    )
  })
  const ticks = `<div class="name muted">rank</div><svg class="axis" height="16"><text x="${at(scale, 1)}" y="12" text-anchor="start">1</text><text x="${at(scale, most)}" y="12" text-anchor="end">${most}</text></svg>`
  return (
    '<div class="legend"><span>each row joins the base rank (circle) to the head rank (square); heavy: a shift beyond reseed noise; grey: at the floor on both sides</span></div>' +
    `<div class="chart">${cells.join('')}${ticks}</div>${limitNote(rows.length, rows.length)}`
  )
}

function nullStrip(name: string, values: readonly number[], observed: number, threshold: number): string {
  const finite = values.filter(Number.isFinite)
  // A tight scale: these statistics sit near 1, and zero would squeeze them into a corner.
  const shown = [...finite, observed, threshold].filter(Number.isFinite)
  const low = Math.min(...shown, 1)
  const high = Math.max(...shown, 1)
  const pad = Math.max((high - low) * 0.08, 0.01)
  const scale: Scale = { low: low - pad, high: high + pad }
  const dots = finite.map((v, i) => `<circle class="null" cx="${at(scale, v)}" cy="${8 + (i % 3) * 6}" r="3"/>`).join('')
  const lines =
    (Number.isFinite(threshold) ? `<line class="threshold" x1="${at(scale, threshold)}" x2="${at(scale, threshold)}" y1="0" y2="28"><title>threshold ${e(formatNumber(threshold))}</title></line>` : '') +
    (Number.isFinite(observed) ? `<line class="observed" x1="${at(scale, observed)}" x2="${at(scale, observed)}" y1="0" y2="28"><title>base vs head ${e(formatNumber(observed))}</title></line>` : '')
  const label = `${name}: base vs head ${formatNumber(observed)}, reseed threshold ${formatNumber(threshold)}`
  return `<div class="name">${e(label)}</div><svg height="30" role="img" aria-label="${e(label)}">${dots}${lines}</svg>${axis(scale, '')}`
}

function agreementChart(agreement: RankAgreement | null): string {
  if (!agreement) return '<p>Rank agreement was not computed for this run.</p>'
  return (
    '<div class="legend"><span>grey dots: two refits of one side (the reseed null); heavy line: base against head; dashed: the threshold</span></div>' +
    '<div class="chart">' +
    nullStrip('Kendall tau-b', agreement.nullKendallTau, agreement.kendallTau, agreement.kendallTauThreshold) +
    nullStrip('rank-biased overlap', agreement.nullRankBiasedOverlap, agreement.rankBiasedOverlap, agreement.rankBiasedOverlapThreshold) +
    '</div>'
  )
}

function scoreStrips(report: GateReport): string {
  if (!report.sides) return ''
  const { base, head } = report.sides
  const scale = scaleOf([...base.scores, ...head.scores])
  const tight = { low: Math.min(...base.scores, ...head.scores), high: Math.max(...base.scores, ...head.scores) }
  const pad = (tight.high - tight.low) * 0.08 || Math.abs(tight.high) * 0.01 || 1
  const s: Scale = Number.isFinite(tight.low) ? { low: tight.low - pad, high: tight.high + pad } : scale
  const strip = (side: SideSummary) => {
    const dots = side.scores.map((v, i) => `<circle class="dot ${side.side}" cx="${at(s, v)}" cy="12" r="5"><title>refit ${i + 1}: ${e(formatNumber(v))}</title></circle>`).join('')
    return `<div class="name">${side.side}, mean ${e(formatNumber(side.scoreMean))}</div><svg height="24" role="img" aria-label="${side.side} holdout scores">${dots}</svg>`
  }
  return `<div class="chart">${strip(base)}${strip(head)}${axis(s, `holdout ${report.settings.metric}`)}</div>`
}

function dropColumnChart(report: GateReport, maxRows: number): string {
  const rows = report.features.map((row) => ({ row, drop: readDropColumn(row) })).filter((x) => x.drop !== null).slice(0, maxRows)
  if (rows.length === 0) return ''
  const scale = scaleOf(rows.flatMap((x) => [x.drop!.mean, x.drop!.lower, x.drop!.upper]))
  const cells = rows.map(({ row, drop }) => {
    const grouped = row.isGroup && row.head ? `, all members left out at once; permuted together ${formatNumber(row.head.mean)} [${formatNumber(row.head.lower)}, ${formatNumber(row.head.upper)}]` : ''
    const title = `${row.name}: drop-column loss ${formatNumber(drop!.mean)} [${formatNumber(drop!.lower)}, ${formatNumber(drop!.upper)}]${grouped}`
    return (
      `<div class="name" data-feature="${e(row.name)}">${nameHtml(row.name)}</div>` +
      `<svg height="20" data-feature="${e(row.name)}" role="img" aria-label="${e(title)}"><line class="zero" x1="${at(scale, 0)}" x2="${at(scale, 0)}" y1="0" y2="20"/>` +
      (Number.isFinite(drop!.lower) && Number.isFinite(drop!.upper) ? `<line class="whisker drop" x1="${at(scale, drop!.lower)}" x2="${at(scale, drop!.upper)}" y1="10" y2="10"/>` : '') +
      `<circle class="drop" cx="${at(scale, drop!.mean)}" cy="10" r="4.5"><title>${e(title)}</title></circle></svg>`
    )
  })
  return `<h2>Drop-column results</h2><p class="note">How much the head's holdout loss grows when the model is refitted without the feature (a group: without all its members at once), with its 95% interval.</p><div class="chart">${cells.join('')}${axis(scale, 'loss growth')}</div>`
}

function table(t: TextTable): string {
  const head = t.header.map((h, j) => `<th class="${t.align[j] === 'right' ? 'r' : ''}">${e(h)}</th>`).join('')
  const body = t.rows.map((row) => `<tr>${row.map((c, j) => `<td class="${t.align[j] === 'right' ? 'r' : ''}">${e(c)}</td>`).join('')}</tr>`).join('')
  return `<div class="tables"><table><thead><tr>${head}</tr></thead><tbody>${body}</tbody></table></div>`
}

function page(title: string, body: string): string {
  return `<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">` +
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">` +
    `<title>${e(title)}</title><style>${style}</style></head><body>${body}</body></html>\n`
}

/**
 * The report as one HTML document. Pure and deterministic: the same report gives the same bytes.
 * Cost: linear in the number of features and findings.
 */
export function renderHtml(report: GateReport, options: HtmlOptions = {}): string {
  const maxRows = options.maxChartRows ?? 300
  if (!Number.isInteger(maxRows) || maxRows < 1) throw new RangeError(`renderHtml needs maxChartRows to be a whole number of at least 1, got ${maxRows}`)
  const tables = tabulateReport(report)
  const verdictWord = report.verdict === 'error' ? 'no verdict' : report.verdict
  const header =
    `<header><h1>plumbline report <span class="verdict v-${report.verdict}">${e(verdictWord.toUpperCase())}</span></h1>` +
    `<p><strong>${e(report.headline)}</strong></p>` +
    (tables.score ? `<p>${[tables.score.sentence, ...tables.score.evidenceLines].map(e).join('<br>')}</p>` : '') +
    (tables.rowSampling.length > 0 ? `<p>${tables.rowSampling.map(e).join('<br>')}</p>` : '') +
    (report.sides ? `<p class="muted">base ${e(report.sides.base.ref)}${report.sides.base.commit ? ` (${e(report.sides.base.commit.slice(0, 12))})` : ''} · head ${e(report.sides.head.ref)}${report.sides.head.commit ? ` (${e(report.sides.head.commit.slice(0, 12))})` : ''} · plumbline ${e(report.tool.version)}</p>` : '') +
    '</header>'
  const findings = tables.findings.length === 0
    ? '<p>None.</p>'
    : tables.findings
        .map((f) => {
          const items = f.evidencePairs.map(([label, value]) => `<dt>${e(label)}</dt><dd>${e(value)}</dd>`)
          return (
            `<article class="finding s-${f.severity}"><h3><span class="sev">${f.severity}</span>${e(f.title)}</h3>` +
            (f.message ? `<p>${e(f.message)}</p>` : '') +
            (items.length ? `<dl class="evidence">${items.join('')}</dl>` : '') +
            '</article>'
          )
        })
        .join('')
  if (report.verdict === 'error') {
    return page('plumbline: no verdict', `${header}<p>${e(noVerdictStatement)}</p><h2>What failed</h2>${findings}`)
  }
  const body = [
    header,
    `<h2>Findings</h2>${findings}`,
    `<h2>Importance per feature</h2><p class="note">How much the holdout ${e(report.settings.metric)} worsens when the feature is replaced by draws from the reference data, mean over ${formatCount(report.settings.refits)} reseeded refits.</p>${importanceChart(report, maxRows)}`,
    `<h2>Ranks, base to head</h2>${rankChart(report, maxRows)}`,
    `<h2>Rank agreement against the reseed null</h2>${agreementChart(report.agreement)}`,
    `<h2>Holdout score per refit</h2>${scoreStrips(report)}`,
    dropColumnChart(report, maxRows),
    `<h2>Tables</h2><h3>Features</h3>${table(tables.features)}`,
    ...(tables.agreement ? [`<h3>Rank agreement</h3>${table(tables.agreement.table)}<p class="note">${e(tables.agreement.note)}</p>`] : []),
    ...(tables.sides ? [`<h3>Models</h3>${table(tables.sides)}`] : []),
    ...(tables.scores ? [`<h3>Scores per refit</h3>${table(limitRows(tables.scores, 1000))}`] : []),
    `<h3>Settings</h3>${table(tables.settings)}${tables.checks.rows.length ? table(tables.checks) : ''}`,
    `<footer><p>${e(reportCaution)}</p></footer>`,
  ]
  return page(`plumbline: ${verdictWord}`, body.join('\n'))
}
