/**
 * A GateReport laid out as plain-string tables and lines, the content both renderers share: the
 * markdown comment escapes every string and hands the tables to markdown-table, the terminal text
 * aligns them. Nothing here is escaped yet, and nothing is cut: `limitRows` and `limitItems` cut.
 */
import { sortFindings } from '../checks/verdict.ts'
import { formatCount, formatNumber, formatPercent, formatPValue } from './format-number.ts'
import type {
  Evidence,
  FeatureRow,
  Finding,
  GateReport,
  RankAgreement,
  Severity,
  SideImportance,
  SideSummary,
} from './report.ts'

export interface TextTable {
  readonly header: readonly string[]
  readonly align: readonly ('left' | 'right')[]
  readonly rows: readonly (readonly string[])[]
}

export interface FindingLines {
  readonly severity: Severity
  readonly title: string
  /** What the finding is about: "leakage; feature: delivered_at_hour". */
  readonly about: string
  readonly message: string
  /** "name = value", one per evidence entry, in the report's order. */
  readonly evidence: readonly string[]
}

export interface ReportTables {
  /** "plumbline: block"; for an error "plumbline: error, no verdict". */
  readonly heading: string
  /** Block first, then warn, then info; the report's order within each. */
  readonly findings: readonly FindingLines[]
  readonly features: TextTable
  readonly featureSet: {
    readonly added: readonly string[]
    readonly removed: readonly string[]
    /** "depot: numeric → categorical". */
    readonly kindChanged: readonly string[]
    /** Features on the head side when nothing changed, else null. */
    readonly unchangedCount: number | null
  }
  readonly agreement: { readonly table: TextTable; readonly note: string } | null
  /** Base and head side by side: ref, commit, model, rows, score. Null when the run had no sides. */
  readonly sides: TextTable | null
  readonly scores: TextTable | null
  readonly seeds: TextTable | null
  readonly settings: TextTable
  readonly checks: TextTable
  readonly timings: TextTable
}

/** Said wherever an 'error' report is shown, in both renderers. */
export const noVerdictStatement =
  'No verdict was reached: the run failed before the models could be compared. An error is not a ' +
  'pass; fix the problem below and run the gate again.'

export const importanceNote =
  'Importance is how much the holdout metric worsens when a feature is replaced by draws from the ' +
  'reference data, averaged over reseeded refits. The floor is the standard deviation of that ' +
  'importance across refits; a feature is above the floor when its 95% interval lies above zero. ' +
  'A shift is a significant change of importance; places moved count among the compared features, ' +
  'those on both sides and above the floor on either.'

export const agreementMissingNote = 'Rank agreement was not computed for this run.'

function formatEvidenceValue(key: string, value: Evidence[string]): string {
  if (value === null) return 'n/a'
  if (typeof value === 'boolean') return value ? 'yes' : 'no'
  if (typeof value === 'string') return value
  return /p-?value$/i.test(key) ? formatPValue(value) : formatNumber(value)
}

function describeFinding(finding: Finding): FindingLines {
  const kind = finding.kind.replace(/-/g, ' ')
  return {
    severity: finding.severity,
    title: finding.title,
    about: finding.feature === undefined ? kind : `${kind}; feature: ${finding.feature}`,
    message: finding.message,
    evidence: Object.entries(finding.evidence).map(([key, value]) => `${key} = ${formatEvidenceValue(key, value)}`),
  }
}

function describeImportance(side: SideImportance | undefined): string {
  if (!side) return '-'
  return `${formatNumber(side.mean)} [${formatNumber(side.lower)}, ${formatNumber(side.upper)}]`
}

function describeName(row: FeatureRow): string {
  if (!row.isGroup) return row.name
  const members = row.members ?? []
  if (members.length === 0) return `${row.name} (group)`
  return `${row.name} (group of ${limitItems(members, 5).join(', ')})`
}

function describeStatus(row: FeatureRow): string {
  const drop = row.head?.dropColumn
  const status = describePlace(row)
  // Drop-column (LOCO) loss on the head, when it was refitted without the feature.
  return drop ? `${status}; drop-column loss ${formatNumber(drop.loss)} [${formatNumber(drop.lower)}, ${formatNumber(drop.upper)}]${drop.isAboveNoise ? '' : ' (noise)'}` : status
}

function describePlace(row: FeatureRow): string {
  if (row.presence === 'removed') return 'removed'
  const floor = row.head?.isAboveFloor ? 'above floor' : 'indistinguishable from zero'
  if (row.presence === 'added') return row.head ? `added, ${floor}` : 'added'
  if (row.shift?.isSignificant) {
    const moved = row.shift.positionsMoved
    if (moved === null || moved === 0) return 'shifted'
    const places = Math.abs(moved) === 1 ? 'place' : 'places'
    return `shifted ${Math.abs(moved)} ${places} ${moved < 0 ? 'up' : 'down'} among compared`
  }
  return floor
}

function tabulateFeatures(features: readonly FeatureRow[]): TextTable {
  return {
    header: [
      'feature',
      'rank base → head',
      'importance base [95% CI]',
      'importance head [95% CI]',
      'floor base (refit SD)',
      'floor head (refit SD)',
      'share of head',
      'status',
    ],
    align: ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'left'],
    rows: features.map((row) => [
      describeName(row),
      `${row.base?.rank ?? '-'} → ${row.head?.rank ?? '-'}`,
      describeImportance(row.base),
      describeImportance(row.head),
      row.base ? formatNumber(row.base.refitSd) : '-',
      row.head ? formatNumber(row.head.refitSd) : '-',
      row.head ? formatPercent(row.head.share) : '-',
      describeStatus(row),
    ]),
  }
}

function describeNull(values: readonly number[]): string {
  const finite = values.filter(Number.isFinite)
  if (finite.length === 0) return 'no pairs'
  const lowest = finite.reduce((a, b) => Math.min(a, b))
  const highest = finite.reduce((a, b) => Math.max(a, b))
  const pairs = finite.length === 1 ? 'pair' : 'pairs'
  return `${formatNumber(lowest)} to ${formatNumber(highest)} over ${formatCount(finite.length)} ${pairs}`
}

function readAgreement(value: number, threshold: number): string {
  if (Number.isNaN(value) || Number.isNaN(threshold)) return 'undefined'
  return value < threshold ? 'below the reseed threshold' : 'within reseed agreement'
}

function tabulateAgreement(agreement: RankAgreement): { table: TextTable; note: string } {
  const { kendallTau, rankBiasedOverlap, kendallTauThreshold, rankBiasedOverlapThreshold } = agreement
  return {
    table: {
      header: ['statistic', 'base vs head', 'reseed threshold', 'reseed null', 'reading'],
      align: ['left', 'right', 'right', 'left', 'left'],
      rows: [
        [
          'Kendall tau-b',
          formatNumber(kendallTau),
          formatNumber(kendallTauThreshold),
          describeNull(agreement.nullKendallTau),
          readAgreement(kendallTau, kendallTauThreshold),
        ],
        [
          `rank-biased overlap, persistence ${formatNumber(agreement.persistence)}`,
          formatNumber(rankBiasedOverlap),
          formatNumber(rankBiasedOverlapThreshold),
          describeNull(agreement.nullRankBiasedOverlap),
          readAgreement(rankBiasedOverlap, rankBiasedOverlapThreshold),
        ],
      ],
    },
    note:
      `Ranks of the ${formatCount(agreement.featuresCompared)} features present on both sides and above ` +
      'the floor on either side, averaged over pairs of one base and one head refit. The reseed null is ' +
      'the same statistic between two refits of one side that differ only in their seed; the threshold ' +
      'is a low percentile of it.',
  }
}

function tabulateSides(base: SideSummary, head: SideSummary, metric: string): TextTable {
  const both = (describe: (side: SideSummary) => string) => [describe(base), describe(head)]
  return {
    header: ['', 'base', 'head'],
    align: ['left', 'left', 'left'],
    rows: [
      ['ref', ...both((side) => side.ref)],
      ['commit', ...both((side) => side.commit ?? '-')],
      ['model', ...both(describeModel)],
      ['features', ...both((side) => formatCount(side.features.length))],
      ['train rows', ...both((side) => formatCount(side.trainRows))],
      ['holdout rows', ...both((side) => formatCount(side.holdoutRows))],
      ['holdout rows used for importance', ...both((side) => formatCount(side.evaluationRows))],
      ['reference rows for draws', ...both((side) => formatCount(side.referenceRows))],
      [`holdout ${metric}, mean over refits`, ...both((side) => formatNumber(side.scoreMean))],
      [`holdout ${metric}, SD over refits`, ...both((side) => formatNumber(side.scoreSd))],
      ['refits', ...both((side) => formatCount(side.scores.length))],
      ['noise covers', ...both((side) => side.noiseCovers.replace(/-/g, ' '))],
    ],
  }
}

/** The description, led by the kind unless the description already names it. */
function describeModel({ model }: SideSummary): string {
  return model.description.includes(model.kind) ? model.description : `${model.kind}: ${model.description}`
}

function tabulatePerRefit(
  header: readonly string[],
  base: readonly number[],
  head: readonly number[],
  format: (value: number) => string,
): TextTable {
  const rows: string[][] = []
  for (let i = 0; i < Math.max(base.length, head.length); i++) {
    rows.push([String(i + 1), i < base.length ? format(base[i]) : '-', i < head.length ? format(head[i]) : '-'])
  }
  return { header, align: ['right', 'right', 'right'], rows }
}

function tabulateSettings(settings: GateReport['settings']): TextTable {
  const direction = settings.higherIsBetter ? 'higher is better' : 'lower is better'
  return {
    header: ['setting', 'value'],
    align: ['left', 'left'],
    rows: [
      ['task', settings.task],
      ['target', settings.target],
      ['metric', `${settings.metric} (${direction})`],
      ['draws per feature and refit', formatCount(settings.draws)],
      ['refits per side', formatCount(settings.refits)],
      ['seed', String(settings.seed)],
      ['policy file', settings.policySource],
      ['policy applied', `the ${settings.policyFrom} side's, to both sides`],
    ],
  }
}

/** Lays the report out; `heading` and `findings` serve every verdict, the rest a completed run. */
export function tabulateReport(report: GateReport): ReportTables {
  const { settings, sides, featureSet } = report
  const changed = featureSet.added.length + featureSet.removed.length + featureSet.kindChanged.length
  const headCount = sides ? sides.head.features.length : report.features.filter((row) => !row.isGroup).length
  return {
    heading: report.verdict === 'error' ? 'plumbline: error, no verdict' : `plumbline: ${report.verdict}`,
    findings: sortFindings(report.findings).map(describeFinding),
    features: tabulateFeatures(report.features),
    featureSet: {
      added: featureSet.added,
      removed: featureSet.removed,
      kindChanged: featureSet.kindChanged.map((change) => `${change.name}: ${change.base} → ${change.head}`),
      unchangedCount: changed === 0 ? headCount : null,
    },
    agreement: report.agreement ? tabulateAgreement(report.agreement) : null,
    sides: sides ? tabulateSides(sides.base, sides.head, settings.metric) : null,
    scores: sides
      ? tabulatePerRefit(['refit', `base ${settings.metric}`, `head ${settings.metric}`], sides.base.scores, sides.head.scores, formatNumber)
      : null,
    seeds: sides
      ? tabulatePerRefit(['refit', 'base seed', 'head seed'], sides.base.refitSeeds, sides.head.refitSeeds, String)
      : null,
    settings: tabulateSettings(settings),
    checks: {
      header: ['check', 'setting', 'value'],
      align: ['left', 'left', 'right'],
      rows: Object.entries(settings.checks).flatMap(([check, values]) =>
        Object.entries(values).map(([key, value]) => [check, key, formatEvidenceValue(key, value)]),
      ),
    },
    timings: {
      header: ['stage', 'seconds'],
      align: ['left', 'right'],
      rows: Object.entries(report.timings).map(([stage, seconds]) => [stage, formatNumber(seconds)]),
    },
  }
}

/** The first `maxRows` rows, then one "N more rows" row when rows were cut. */
export function limitRows(table: TextTable, maxRows: number): TextTable {
  if (table.rows.length <= maxRows) return table
  const cut = table.rows.length - maxRows
  const more = [`${formatCount(cut)} more ${cut === 1 ? 'row' : 'rows'}`, ...table.header.slice(1).map(() => '')]
  return { ...table, rows: [...table.rows.slice(0, maxRows), more] }
}

/** The first `maxItems` items, then "and N more" when items were cut. */
export function limitItems(items: readonly string[], maxItems: number): string[] {
  if (items.length <= maxItems) return [...items]
  return [...items.slice(0, maxItems), `and ${formatCount(items.length - maxItems)} more`]
}
