/**
 * The terminal view of a GateReport: the same content as the markdown comment, in plain text with
 * aligned columns, no markdown and no ANSI colour. Report strings lose their control characters
 * (an ESC in a feature name could otherwise drive the terminal) through escapePlainText. Widths
 * count code points, so wide (CJK) characters and combining marks can misalign a column.
 */
import { sortFindings } from '../checks/verdict.ts'
import { escapePlainText } from './escape.ts'
import { formatCount } from './format-number.ts'
import { reportCaution, type GateReport } from './report.ts'
import {
  agreementMissingNote,
  importanceNote,
  limitItems,
  limitRows,
  noVerdictStatement,
  tabulateReport,
  type TextTable,
} from './tabulate-report.ts'

export interface TextOptions {
  /** Columns to wrap prose at; tables wrap their headers to fit but never cut a cell. Default 100. */
  readonly width?: number
  /** Rows of the longest tables before the "N more rows" row; default 50. */
  readonly maxTableRows?: number
}

const length = (text: string) => [...text].length

/**
 * Greedy word wrap at `width` columns: the first line starts with `indent`, the others with
 * `hangingIndent`. A word longer than a line overflows it rather than being split.
 */
function wrap(text: string, width: number, indent: string, hangingIndent = indent): string[] {
  const lines: string[] = []
  let line = ''
  for (const word of escapePlainText(text).split(' ').filter((w) => w !== '')) {
    const lead = lines.length === 0 ? indent : hangingIndent
    if (line !== '' && length(lead) + length(line) + 1 + length(word) > width) {
      lines.push(lead + line)
      line = word
    } else {
      line = line === '' ? word : `${line} ${word}`
    }
  }
  if (line !== '') lines.push((lines.length === 0 ? indent : hangingIndent) + line)
  return lines
}

/**
 * Columns two spaces apart, numbers right-aligned, a dashed rule under the header. Cells are never
 * cut: when the table is wider than `width`, headers wrap onto two lines (bottom-aligned) so a
 * column is about as wide as its widest cell; a table can still be wider than `width`.
 */
function renderTable(table: TextTable, width: number, indent: string): string[] {
  const gap = '  '
  const body = table.rows.map((row) => row.map(escapePlainText))
  const header = table.header.map(escapePlainText)
  const widest = (j: number) => Math.max(0, ...body.map((row) => length(row[j] ?? '')))
  const span = (widths: number[]) => length(indent) + widths.reduce((sum, w) => sum + w, 0) + gap.length * (widths.length - 1)
  let widths = header.map((name, j) => Math.max(widest(j), length(name)))
  let headerLines = header.map((name) => [name])
  if (span(widths) > width) {
    // Each header on at most two lines, no narrower than its cells.
    widths = header.map((name, j) => {
      let w = Math.max(widest(j), ...name.split(' ').map(length))
      while (wrap(name, w, '').length > 2) w++
      return w
    })
    headerLines = header.map((name, j) => wrap(name, widths[j], ''))
  }
  const depth = Math.max(...headerLines.map((lines) => lines.length))
  const line = (row: readonly string[]) =>
    (
      indent +
      row
        .map((cell, j) => {
          const pad = ' '.repeat(Math.max(0, widths[j] - length(cell)))
          return table.align[j] === 'right' ? pad + cell : cell + pad
        })
        .join(gap)
    ).trimEnd()
  const headerRows = Array.from({ length: depth }, (_, k) =>
    headerLines.map((lines) => lines[k - (depth - lines.length)] ?? ''),
  )
  return [...headerRows.map(line), indent + widths.map((w) => '-'.repeat(w)).join(gap), ...body.map(line)]
}

function section(title: string, body: readonly string[]): string {
  return [title, ...body].join('\n')
}

function renderError(report: GateReport, width: number): string {
  const messages = sortFindings(report.findings).filter((finding) => finding.kind === 'run-error')
  const blocks = messages.map((finding) =>
    finding.message
      .split(/\r\n|\n|\r/)
      .map((line) => `    ${escapePlainText(line)}`.trimEnd())
      .join('\n'),
  )
  return [
    'plumbline: error, no verdict',
    wrap(report.headline, width, '').join('\n'),
    wrap(noVerdictStatement, width, '').join('\n'),
    ...(blocks.length > 0 ? blocks : ['The report holds no run-error finding to show.']),
  ].join('\n\n')
}

/**
 * The report as terminal text, without a final line break. Throws a RangeError for a width under
 * 40 or a maxTableRows under 1. Cost: linear in the report's size.
 */
export function renderText(report: GateReport, options: TextOptions = {}): string {
  const width = options.width ?? 100
  const maxTableRows = options.maxTableRows ?? 50
  if (!Number.isInteger(width) || width < 40) {
    throw new RangeError(`renderText needs width to be a whole number of at least 40, got ${width}`)
  }
  if (!Number.isInteger(maxTableRows) || maxTableRows < 1) {
    throw new RangeError(`renderText needs maxTableRows to be a whole number of at least 1, got ${maxTableRows}`)
  }
  if (report.verdict === 'error') return renderError(report, width)
  const tables = tabulateReport(report)
  const table = (t: TextTable) => renderTable(t, width, '  ')
  const longTable = (t: TextTable) => table(limitRows(t, maxTableRows))

  const findings =
    tables.findings.length === 0
      ? section('Findings', ['  None.'])
      : section(
          `Findings (${formatCount(tables.findings.length)})`,
          tables.findings.flatMap((finding) => [
            ...wrap(`${finding.severity}: ${finding.title} (${finding.about})`, width, '  ', '      '),
            ...wrap(finding.message, width, '      '),
            ...(finding.evidence.length > 0
              ? wrap(`evidence: ${limitItems(finding.evidence, maxTableRows).join('; ')}`, width, '      ')
              : []),
          ]),
        )

  const features =
    tables.features.rows.length === 0
      ? section('Feature importance', ['  No features were measured.'])
      : section('Feature importance', [...wrap(importanceNote, width, '  '), '', ...longTable(tables.features)])

  const { added, removed, kindChanged, unchangedCount } = tables.featureSet
  const names = (label: string, list: readonly string[]) =>
    list.length === 0
      ? []
      : wrap(`${label} (${formatCount(list.length)}): ${limitItems(list, maxTableRows).join(', ')}`, width, '  ')
  const featureSet = section(
    'Feature set',
    unchangedCount !== null
      ? [`  The same ${formatCount(unchangedCount)} features on both sides.`]
      : [...names('Added', added), ...names('Removed', removed), ...names('Changed kind', kindChanged)],
  )

  const agreement = section(
    'Rank agreement',
    tables.agreement
      ? [...table(tables.agreement.table), '', ...wrap(tables.agreement.note, width, '  ')]
      : wrap(agreementMissingNote, width, '  '),
  )

  const details = [
    ...(tables.sides && tables.scores
      ? [section('Models and holdout scores per refit', [...table(tables.sides), '', ...longTable(tables.scores)])]
      : []),
    ...(tables.seeds ? [section('Refit seeds', longTable(tables.seeds))] : []),
    section('Settings and check thresholds', [
      ...table(tables.settings),
      ...(tables.checks.rows.length > 0 ? ['', ...longTable(tables.checks)] : []),
    ]),
    section(
      'Timings (wall-clock seconds; they vary from run to run)',
      [...(tables.timings.rows.length > 0 ? longTable(tables.timings) : ['  None recorded.']), ...(tables.cacheNote ? wrap(tables.cacheNote, width, '  ') : [])],
    ),
  ]

  return [
    tables.heading,
    wrap(report.headline, width, '').join('\n'),
    ...(tables.score ? [[tables.score.sentence, ...tables.score.evidenceLines].flatMap((line) => wrap(line, width, '')).join('\n')] : []),
    ...(tables.rowSampling.length > 0 ? [tables.rowSampling.flatMap((line) => wrap(line, width, '')).join('\n')] : []),
    findings,
    features,
    featureSet,
    agreement,
    ...details,
    wrap(reportCaution, width, '').join('\n'),
  ].join('\n\n')
}
