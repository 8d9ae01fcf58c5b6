/**
 * The pull-request comment (and the job summary): a GateReport as GitHub-flavored markdown.
 *
 * Layout, for a reader with ten seconds: hidden marker, verdict heading, the headline (the cause in
 * plain words); the holdout score of both sides with its change in reseed SDs, and lift and
 * drop-column evidence when the report has them; the findings (block and warn in full, info as one
 * line each); a mermaid chart of the top features' importance; the feature-set change; the caution;
 * a link to the HTML report when there is one. Then, collapsed: the info findings in full, the
 * feature table, rank agreement, models and scores per refit, refit seeds, settings, timings.
 * An 'error' report shows the headline, the run error in a code block and no caution (no verdict
 * was reached, so there is nothing to caution about).
 *
 * Every string from the report goes through escapeMarkdownText / escapeMarkdownCell: a report
 * may come from an untrusted job. The output never exceeds `maxCharacters` (UTF-16 code units,
 * which is at least the number of characters GitHub counts): tables are cut first, then the
 * details, then findings from the end (info first), and the note says what was cut.
 */
import { markdownTable } from 'markdown-table'

import { sortFindings } from '../checks/verdict.ts'
import { escapeMarkdownCell, escapeMarkdownText, markdownCodeBlock } from './escape.ts'
import { formatCount } from './format-number.ts'
import { mermaidChart } from './render-mermaid.ts'
import { reportCaution, type GateReport, type Severity } from './report.ts'
import {
  agreementMissingNote,
  importanceNote,
  limitItems,
  limitRows,
  noVerdictStatement,
  tabulateReport,
  type FindingLines,
  type TextTable,
} from './tabulate-report.ts'
import { tabulateSlices, tabulateViews } from './tabulate-views.ts'

export interface MarkdownOptions {
  /** Rows of the longest tables before the "N more rows" row; default 50. */
  readonly maxTableRows?: number
  /** Upper bound on the output's length; default 60,000 (GitHub refuses comments over 65,536). */
  readonly maxCharacters?: number
  /** The hidden first line that finds the comment again on a rerun; default `<!-- plumbline -->`. */
  readonly marker?: string
  /** Where the reader finds what a cut left out; one sentence of plain text. */
  readonly fullReportNote?: string
  /** The HTML report's address (an artifact), linked below the caution; https only. */
  readonly htmlReportUrl?: string
}

const defaultFullReportNote = "The full report is in the workflow run's job summary and in the JSON report file."

/** A finding's message longer than this is cut in the comment (the JSON keeps all of it). */
const maxMessageCharacters = 3000

/** Info findings listed by title before the first collapsed section (the rest only in the details). */
const visibleInfoTitles = 10

const severityWord: Readonly<Record<Severity, string>> = { block: 'Block', warn: 'Warn', info: 'Info' }

const fenceOpen = '```mermaid'

/** What one composition keeps: feature-table rows (0: none), the details, how many findings. */
interface Layout {
  readonly rows: number
  readonly details: boolean
  readonly findings: number
}

function renderTable(table: TextTable): string {
  const cells = [table.header, ...table.rows].map((row) => row.map(escapeMarkdownCell))
  return markdownTable(cells, {
    align: table.align.map((side) => (side === 'right' ? 'r' : 'l')),
    alignDelimiters: false,
  })
}

function renderDetails(summary: string, blocks: readonly string[]): string {
  return ['<details>', `<summary>${summary}</summary>`, '', ...blocks.flatMap((block) => [block, '']), '</details>'].join(
    '\n',
  )
}

/** The message cut to `maxCharacters` before escaping, saying how much was cut. */
function shortenMessage(message: string, maxCharacters: number): string {
  if (message.length <= maxCharacters) return message
  const cut = message.length - maxCharacters
  return `${message.slice(0, maxCharacters)} … (${formatCount(cut)} more characters in the full report)`
}

/** A block or warn finding in full; an info finding as its title only (in full in the details). */
function renderFinding(finding: FindingLines, maxItems: number, isFull: boolean): string {
  const lines = [`- **${severityWord[finding.severity]}:** ${escapeMarkdownText(finding.title)}`]
  if (isFull) {
    const message = escapeMarkdownText(shortenMessage(finding.message, maxMessageCharacters))
    if (message !== '') lines.push(message)
    if (finding.evidence.length > 0) {
      lines.push(`Evidence: ${limitItems(finding.evidence, maxItems).map(escapeMarkdownText).join('; ')}.`)
    }
  }
  return lines.join('\n').replace(/\n/g, '\n  ')
}

function countBySeverity(findings: readonly { readonly severity: Severity }[]): string {
  return (['block', 'warn', 'info'] as const)
    .map((severity) => [severity, findings.filter((finding) => finding.severity === severity).length] as const)
    .filter(([, count]) => count > 0)
    .map(([severity, count]) => `${formatCount(count)} ${severity}`)
    .join(', ')
}

function checkOptions(options: MarkdownOptions): Required<MarkdownOptions> {
  const resolved = {
    maxTableRows: options.maxTableRows ?? 50,
    maxCharacters: options.maxCharacters ?? 60_000,
    marker: options.marker ?? '<!-- plumbline -->',
    fullReportNote: options.fullReportNote ?? defaultFullReportNote,
    htmlReportUrl: options.htmlReportUrl ?? '',
  }
  if (resolved.htmlReportUrl !== '' && !/^https:\/\/[^\s<>()"'`\\]+$/.test(resolved.htmlReportUrl)) {
    throw new RangeError(`renderMarkdown needs htmlReportUrl to be an https address without spaces or brackets, got '${resolved.htmlReportUrl}'`)
  }
  if (!Number.isInteger(resolved.maxTableRows) || resolved.maxTableRows < 1) {
    throw new RangeError(`renderMarkdown needs maxTableRows to be a whole number of at least 1, got ${resolved.maxTableRows}`)
  }
  if (!Number.isInteger(resolved.maxCharacters) || resolved.maxCharacters < 1000) {
    throw new RangeError(
      `renderMarkdown needs maxCharacters to be a whole number of at least 1000, got ${resolved.maxCharacters}`,
    )
  }
  // An HTML comment as CommonMark 0.30 §6.6 defines it, on one line, so the marker stays hidden.
  if (!/^<!--(?!>|->)(?:(?!--)[^\n])*-->$/.test(resolved.marker)) {
    throw new RangeError(`renderMarkdown needs the marker to be a one-line HTML comment, got '${resolved.marker}'`)
  }
  return resolved
}

function memoize(render: (size: number) => string): (size: number) => string {
  const rendered = new Map<number, string>()
  return (size) => {
    if (!rendered.has(size)) rendered.set(size, render(size))
    return rendered.get(size)!
  }
}

function fitOrThrow(markdown: string, maxCharacters: number): string {
  if (markdown.length > maxCharacters) {
    throw new RangeError(
      `renderMarkdown cannot fit the report into ${maxCharacters} characters: its shortest form takes ${markdown.length}`,
    )
  }
  return markdown
}

function renderError(report: GateReport, options: Required<MarkdownOptions>): string {
  const messages = sortFindings(report.findings)
    .filter((finding) => finding.kind === 'run-error')
    .map((finding) => finding.message)
  const compose = (budget: number) => {
    let left = budget
    const blocks = messages.map((message) => {
      const kept = message.slice(0, Math.max(0, left))
      left -= kept.length
      const cut = message.length - kept.length
      return markdownCodeBlock(cut > 0 ? `${kept}\n[${formatCount(cut)} more characters in the full report]` : kept)
    })
    const shortened = messages.join('').length > budget
    return [
      options.marker,
      '### plumbline: error, no verdict',
      escapeMarkdownText(report.headline),
      escapeMarkdownText(noVerdictStatement),
      ...(blocks.length > 0 ? blocks : ['The report holds no run-error finding to show.']),
      ...(shortened
        ? [escapeMarkdownText(`The error message was shortened to fit this comment. ${options.fullReportNote}`)]
        : []),
    ].join('\n\n') + '\n'
  }
  const full = compose(Infinity)
  if (full.length <= options.maxCharacters) return full
  const overhead = compose(0).length
  return fitOrThrow(compose(options.maxCharacters - overhead), options.maxCharacters)
}

/**
 * The report as one GitHub-flavored markdown comment, at most `maxCharacters` long. Throws a
 * RangeError for options out of range, or when even the shortest form (marker, heading, headline,
 * caution) does not fit, which the schema's length caps rule out for 2,000 characters and up.
 * Cost: linear in the report's size, plus a binary search over findings when they must be cut.
 */
export function renderMarkdown(report: GateReport, options: MarkdownOptions = {}): string {
  const resolved = checkOptions(options)
  if (report.verdict === 'error') return renderError(report, resolved)
  const { maxTableRows, maxCharacters } = resolved
  const tables = tabulateReport(report)
  const findingItems = tables.findings.map((finding) => renderFinding(finding, maxTableRows, finding.severity !== 'info'))
  const nameLists = [tables.featureSet.added, tables.featureSet.removed, tables.featureSet.kindChanged]
  const longestList = Math.max(...nameLists.map((list) => list.length))

  const agreement = tables.agreement
    ? renderDetails('Rank agreement against the reseed null', [renderTable(tables.agreement.table), escapeMarkdownText(tables.agreement.note)])
    : renderDetails('Rank agreement', [agreementMissingNote])
  const details = [
    agreement,
    ...(tables.sides && tables.scores
      ? [
          renderDetails('Models and holdout scores per refit', [
            renderTable(tables.sides),
            renderTable(limitRows(tables.scores, maxTableRows)),
          ]),
        ]
      : []),
    ...((views) => (views ? [renderDetails('Prediction sensitivity and gain', [escapeMarkdownText(views.note), renderTable(limitRows(views.table, maxTableRows))])] : []))(tabulateViews(report)),
    ...((slices) => (slices ? [renderDetails('Slices', ['* marks a score worse beyond reseed noise.', renderTable(limitRows(slices, maxTableRows))])] : []))(tabulateSlices(report)),
    ...(tables.seeds ? [renderDetails('Refit seeds', [renderTable(limitRows(tables.seeds, maxTableRows))])] : []),
    renderDetails('Settings and check thresholds', [
      renderTable(tables.settings),
      ...(tables.checks.rows.length > 0 ? [renderTable(limitRows(tables.checks, maxTableRows))] : []),
    ]),
    renderDetails('Timings', [
      'Wall-clock seconds per stage; they vary from run to run and are not part of the result.',
      ...(tables.timings.rows.length > 0 ? [renderTable(limitRows(tables.timings, maxTableRows))] : []),
      ...(tables.cacheNote ? [escapeMarkdownText(tables.cacheNote)] : []),
    ]),
  ]
  const score = tables.score
    ? [tables.score.sentence, ...tables.score.evidenceLines].map(escapeMarkdownText).join('\n')
    : null
  // Multiclass: the task and its classes in the order of the probability columns, in view.
  const classes = report.settings.classes
  const classLine =
    report.settings.task === 'multiclass' && classes
      ? escapeMarkdownText(`Task: multiclass, ${formatCount(classes.length)} classes: ${limitItems(classes, 20).join(', ')}.`)
      : null
  const chart = mermaidChart(report)
  const chartBlock = chart === null ? null : `${fenceOpen}\n${chart}\n\`\`\``
  const htmlLink =
    resolved.htmlReportUrl === ''
      ? null
      : `The HTML report, with charts of every feature: [download it from the workflow run](${resolved.htmlReportUrl}).`

  function renderFindings(shown: number): string {
    if (findingItems.length === 0) return '#### Findings\n\nNone.'
    const hidden = findingItems.length - shown
    const more = hidden > 0 ? [`- ${formatCount(hidden)} more findings are not shown here; see the note below.`] : []
    // Info titles past the first few stay out of the visible part (the details below list them in
    // full), so the comment's first screen stays one screen however many consequences a change has.
    const visible = findingItems.slice(0, shown).filter((_, i) => tables.findings[i].severity !== 'info' || infoRank(i) < visibleInfoTitles)
    const folded = Math.min(shown, findingItems.length) - visible.length
    const foldedNote = folded > 0 ? [`- ${formatCount(folded)} more info ${folded === 1 ? 'finding' : 'findings'}, in full in the details below.`] : []
    const items = [...visible, ...foldedNote, ...more].join('\n')
    return `#### Findings: ${countBySeverity(tables.findings)}\n\n${items}`
  }

  /** How many info findings come before finding i. */
  function infoRank(i: number): number {
    return tables.findings.slice(0, i).filter((finding) => finding.severity === 'info').length
  }

  /** The info findings shown, with their messages and evidence, collapsed. */
  function renderInfoDetails(shown: number): string[] {
    const kept = tables.findings.slice(0, shown).filter((finding) => finding.severity === 'info')
    if (kept.length === 0) return []
    const items = kept.map((finding) => renderFinding(finding, maxTableRows, true).replace(/^- \*\*Info:\*\* /, '- '))
    return [renderDetails(`The ${formatCount(kept.length)} info ${kept.length === 1 ? 'finding' : 'findings'} in full`, [items.join('\n')])]
  }

  function renderFeatures(rows: number): string {
    const count = tables.features.rows.length
    const summary = `Feature importance, ${formatCount(count)} ${count === 1 ? 'row' : 'rows'}`
    if (count === 0) return renderDetails('Feature importance', ['No features were measured.'])
    if (rows === 0) return renderDetails(summary, [`The table of ${formatCount(count)} rows is left out; see the note below.`])
    return renderDetails(summary, [escapeMarkdownText(importanceNote), renderTable(limitRows(tables.features, rows))])
  }

  function renderFeatureSet(maxItems: number): string {
    const { added, removed, kindChanged, unchangedCount } = tables.featureSet
    if (unchangedCount !== null) return `Feature set: the same ${formatCount(unchangedCount)} features on both sides.`
    const part = (label: string, names: readonly string[]) => {
      if (names.length === 0) return []
      if (maxItems === 0) return [`${label} ${formatCount(names.length)} (names left out)`]
      return [`${label} ${limitItems(names, maxItems).map(escapeMarkdownText).join(', ')}`]
    }
    const parts = [...part('added', added), ...part('removed', removed), ...part('changed kind:', kindChanged)]
    return `Feature set: ${parts.join('; ')}.`
  }

  function describeCuts(layout: Layout): string | null {
    const cuts: string[] = []
    const count = tables.features.rows.length
    if (layout.rows < maxTableRows && count > layout.rows) {
      cuts.push(
        layout.rows === 0
          ? `the feature table (${formatCount(count)} rows) is left out`
          : `the feature table shows ${layout.rows} of ${formatCount(count)} rows`,
      )
    }
    if (layout.rows < maxTableRows && longestList > layout.rows) {
      cuts.push(
        layout.rows === 0
          ? 'the feature-set lists give counts only'
          : `the feature-set lists show at most ${layout.rows} names each`,
      )
    }
    if (!layout.details) cuts.push('the details (info findings in full, rank agreement, models, scores and seeds per refit, settings, timings) are left out')
    if (layout.findings < findingItems.length) {
      const hidden = tables.findings.slice(layout.findings)
      const shown = `${formatCount(layout.findings)} of ${formatCount(findingItems.length)} findings are shown`
      cuts.push(`${shown} (not shown: ${countBySeverity(hidden)})`)
    }
    if (cuts.length === 0) return null
    const limit = `This comment was shortened to stay under ${formatCount(maxCharacters)} characters`
    return escapeMarkdownText(`${limit}: ${cuts.join('; ')}. ${resolved.fullReportNote}`)
  }

  // The layouts tried share most sections: render each variant once.
  const findingsSection = memoize(renderFindings)
  const featuresSection = memoize(renderFeatures)
  const featureSetSection = memoize(renderFeatureSet)

  /** The paragraphs of one layout; `join` makes the comment, `measure` its length without building it. */
  function compose(layout: Layout): string[] {
    const cutNote = describeCuts(layout)
    return [
      resolved.marker,
      `### ${escapeMarkdownText(tables.heading)}`,
      escapeMarkdownText(report.headline),
      ...(score === null ? [] : [score]),
      ...(tables.rowSampling.length === 0 ? [] : [tables.rowSampling.map(escapeMarkdownText).join('\n')]),
      findingsSection(layout.findings),
      ...(chartBlock === null ? [] : [chartBlock]),
      featureSetSection(layout.rows),
      ...(classLine === null ? [] : [classLine]),
      escapeMarkdownText(reportCaution),
      ...(htmlLink === null ? [] : [htmlLink]),
      ...(cutNote === null ? [] : [cutNote]),
      ...(layout.details ? renderInfoDetails(layout.findings) : []),
      featuresSection(layout.rows),
      ...(layout.details ? details : []),
    ]
  }
  const join = (paragraphs: readonly string[]) => `${paragraphs.join('\n\n')}\n`
  const fits = (layout: Layout) => {
    const paragraphs = compose(layout)
    return paragraphs.reduce((sum, paragraph) => sum + paragraph.length + 2, -1) <= maxCharacters
  }

  const rowSteps = [...new Set([maxTableRows, 20, 10, 5, 0].filter((rows) => rows <= maxTableRows))]
  for (const keepDetails of [true, false]) {
    for (const rows of rowSteps) {
      const layout = { rows, details: keepDetails, findings: findingItems.length }
      if (fits(layout)) return join(compose(layout))
    }
  }
  // Findings must be cut too: as many as fit (binary search; the length grows with each one),
  // beside a short feature table while at least one finding still fits with it.
  const mostFindings = (rows: number) => {
    let low = 0
    let high = findingItems.length
    while (low < high) {
      const middle = Math.ceil((low + high) / 2)
      if (fits({ rows, details: false, findings: middle })) low = middle
      else high = middle - 1
    }
    return low
  }
  const shortTable = Math.min(10, maxTableRows)
  const besideShortTable = mostFindings(shortTable)
  const layout =
    besideShortTable > 0
      ? { rows: shortTable, details: false, findings: besideShortTable }
      : { rows: 0, details: false, findings: mostFindings(0) }
  return fitOrThrow(join(compose(layout)), maxCharacters)
}
