/**
 * A GateReport laid out as plain-string tables and lines, the content both renderers share: the
 * markdown comment escapes every string and hands the tables to markdown-table, the terminal text
 * aligns them. Nothing here is escaped yet, and nothing is cut: `limitRows` and `limitItems` cut.
 */
import { sortFindings } from '../checks/verdict.ts'
import { studentTQuantile } from '../statistics/student-t-quantile.ts'
import { formatChange, formatCount, formatNumber, formatPercent, formatPValue } from './format-number.ts'
import type {
  Evidence,
  FeatureRow,
  Finding,
  GateReport,
  RankAgreement,
  Severity,
  SideImportance,
  RowSample,
  SideSummary,
} from './report.ts'
import { pooledStandardDeviation } from '../statistics/pooled-standard-deviation.ts'

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
  /** "label value" in words, one per evidence entry, in the report's order (machine keys stay in the JSON). */
  readonly evidence: readonly string[]
  /** The same as [label, value] pairs. */
  readonly evidencePairs: readonly (readonly [string, string])[]
}

/** The holdout score of both sides, the change and how many reseed SDs it moved; null without sides. */
export interface ScoreSummary {
  /** "Holdout log-loss (lower is better): base 0.6395 [0.6378, 0.6412] → head 0.5695 [...], -11%, 29.3 reseed SDs better (95% intervals over refits)." */
  readonly sentence: string
  /** Per-feature lines of drop-column results and lift evidence, when the report has them. */
  readonly evidenceLines: readonly string[]
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
  readonly score: ScoreSummary | null
  /** Base and head side by side: ref, commit, model, rows, score. Null when the run had no sides. */
  readonly sides: TextTable | null
  /** One sentence per table a row cap sampled ("Training rows sampled ..."); empty when none was. */
  readonly rowSampling: readonly string[]
  readonly scores: TextTable | null
  readonly seeds: TextTable | null
  readonly settings: TextTable
  readonly checks: TextTable
  readonly timings: TextTable
  /** With a unit cache: which work units came from it (like timings, not part of the result). */
  readonly cacheNote: string | null
}

/** Said wherever an 'error' report is shown, in both renderers. */
export const noVerdictStatement =
  'No verdict was reached: the run failed before the models could be compared. An error is not a ' +
  'pass; fix the problem below and run the gate again.'

export const importanceNote =
  'Importance is how much the holdout metric worsens when a feature is replaced by draws from the ' +
  'reference data, averaged over reseeded refits. The floor is the standard deviation of that ' +
  'importance across refits; a feature is above the floor when its 95% interval lies above zero. ' +
  'A shift is a significant change of importance, given as a signed percentage of the base value; ' +
  "ranks are each side's own, by mean importance."

export const agreementMissingNote = 'Rank agreement was not computed for this run.'

/** Words for the evidence keys the checks write; any other key is spelled out from its camelCase. */
const evidenceLabels: Readonly<Record<string, string>> = {
  baseMean: 'base mean',
  headMean: 'head mean',
  relativeChange: 'change against the larger mean',
  baseRefitSd: 'base reseed SD',
  headRefitSd: 'head reseed SD',
  welchT: "Welch's t",
  welchDf: 'Welch df',
  pValue: 'p',
  adjustedPValue: 'adjusted p',
  baseRank: 'base rank',
  headRank: 'head rank',
  positionsMoved: 'places moved among shared features',
  share: 'share of the importance',
  baseShare: 'base share of the importance',
  runnerUpRatio: 'times the runner-up',
  runnerUp: 'runner-up',
  singleFeatureSeparation: 'a model on it alone, holdout score',
  singleFeatureClass: 'the class it separates best',
  baseSingleFeatureSeparation: 'a model on it alone on the base, holdout score',
  fullModelSeparation: 'the full model, holdout score',
  baseFullModelSeparation: 'the base full model, holdout score',
  separationJumpInSds: 'full model moved, reseed SDs',
  relativePower: "share of the full model's gain alone",
  threshold: 'policy line',
  isNew: 'new in this pull request',
  isChanged: 'changed in this pull request',
  wasDominantOnBase: 'dominant on the base already',
  worsening: 'worsening',
  tolerance: 'tolerance',
  standardError: 'standard error',
  alpha: 'level',
  worseningInReseedSds: 'worsening in reseed SDs',
  kendallTau: 'Kendall tau-b',
  rankBiasedOverlap: 'rank-biased overlap',
  kendallTauThreshold: 'Kendall tau-b reseed threshold',
  rankBiasedOverlapThreshold: 'rank-biased overlap reseed threshold',
  featuresCompared: 'features compared',
  nullPairs: 'reseed pairs',
  headLower: 'head interval low',
  headUpper: 'head interval high',
  mean: 'mean',
  lower: 'interval low',
  upper: 'interval high',
  added: 'added',
  removed: 'removed',
  kindChanged: 'changed kind',
  cause: 'cause',
  causeShare: "cause's share of the importance",
  featuresExplained: 'features explained',
  fellToFloor: 'fell to the floor',
  sharedTotalBase: 'shared features, base total',
  sharedTotalHead: 'shared features, head total',
  proportionalFactor: 'proportional factor',
  explained: 'explained',
  liftShare: 'lift (share of the loss the base model left)',
  removedShare: 'share of the loss removed',
  dropColumnLoss: 'drop-column loss',
  dropColumnLower: 'drop-column interval low',
  dropColumnUpper: 'drop-column interval high',
  dropColumnPValue: 'drop-column p',
  dropColumnInReseedSds: 'drop-column loss in reseed SDs',
  dropColumnAboveNoise: 'drop-column loss above noise',
  baseLoss: 'base loss',
  headLoss: 'head loss',
  powerAgainstBaseModel: 'power against the base model',
  powerAgainstBestFeature: 'power against the best existing feature',
  bestExistingFeature: 'best existing feature',
  sliceColumn: 'slice column',
  sliceValue: 'slice value',
  sliceRows: 'slice rows',
  sliceSeparation: 'a model on it alone in the slice, holdout score',
  baseSliceSeparation: 'a model on it alone in the slice on the base, holdout score',
  baseRows: 'base rows',
  headRows: 'head rows',
  differingRows: 'rows that differ',
  idsOnlyOnHead: 'ids only on the head',
  firstDifferingRow: 'first differing row',
  isUserError: 'a problem in the inputs',
}

/** A camelCase machine key in words: "dropColumnLoss" → "drop column loss". */
export function evidenceLabel(key: string): string {
  return evidenceLabels[key] ?? key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[_-]+/g, ' ').toLowerCase()
}

/** Shares print as percentages, p-values with two digits, booleans as yes / no. */
export function formatEvidenceValue(key: string, value: Evidence[string]): string {
  if (value === null) return 'n/a'
  if (typeof value === 'boolean') return value ? 'yes' : 'no'
  if (typeof value === 'string') return value
  if (/p-?value$/i.test(key) || key === 'alpha') return formatPValue(value)
  if (/(^s|S)hare$|^relativeChange$|^relativePower$/.test(key)) return formatPercent(value)
  return formatNumber(value)
}

/**
 * The evidence worth words: nothing about a side that does not have the finding's feature (a base
 * share of an added feature is no measurement), and no "not computed" entry.
 */
function evidenceInWords(finding: Finding, featureSet: GateReport['featureSet']): [string, Evidence[string]][] {
  const missing = finding.feature === undefined ? null : featureSet.added.includes(finding.feature) ? 'base' : featureSet.removed.includes(finding.feature) ? 'head' : null
  return Object.entries(finding.evidence).filter(([key, value]) => value !== null && !(missing !== null && key.startsWith(missing)))
}

function describeFinding(finding: Finding, task: GateReport['settings']['task'], featureSet: GateReport['featureSet']): FindingLines {
  const kind = finding.kind.replace(/-/g, ' ')
  const entries = evidenceInWords(finding, featureSet)
  // A one-feature model's and the full model's "separation" is AUC for a binary task, R² for
  // regression, one-vs-rest AUC for multiclass (the one-feature model's best class, the full model's macro mean).
  const label = (key: string) =>
    evidenceLabel(key).replace('holdout score', task === 'binary' ? 'holdout AUC' : task === 'multiclass' ? 'holdout one-vs-rest AUC' : 'holdout R²')
  return {
    severity: finding.severity,
    title: finding.title,
    about: finding.feature === undefined ? kind : `${kind}; feature: ${finding.feature}`,
    message: finding.message,
    evidence: entries.map(([key, value]) => `${label(key)} ${formatEvidenceValue(key, value)}`),
    evidencePairs: entries.map(([key, value]) => [label(key), formatEvidenceValue(key, value)] as const),
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

/** The drop-column loss has a column of its own; the status says only when that loss is noise. */
function describeStatus(row: FeatureRow): string {
  const drop = row.head?.dropColumn
  const status = describePlace(row)
  return drop && !drop.isAboveNoise ? `${status}; drop-column loss within reseed noise` : status
}

function describePlace(row: FeatureRow): string {
  if (row.presence === 'removed') return 'removed'
  const floor = row.head?.isAboveFloor ? 'above floor' : 'indistinguishable from zero'
  if (row.presence === 'added') return row.head ? `added, ${floor}` : 'added'
  if (row.shift?.isSignificant && row.base && row.head) {
    return `shifted ${formatChange(row.base.mean, row.head.mean)}${row.head.isAboveFloor ? '' : ', now indistinguishable from zero'}`
  }
  return floor
}

function tabulateFeatures(features: readonly FeatureRow[]): TextTable {
  // A drop-column column only when some feature was refitted without (the leakage check's refits).
  const drops = features.map(readDropColumn)
  const hasDrop = drops.some((drop) => drop !== null)
  const describeDrop = (drop: ReturnType<typeof readDropColumn>) =>
    drop === null ? '-' : `${formatNumber(drop.mean)} [${formatNumber(drop.lower)}, ${formatNumber(drop.upper)}]${drop.isAboveNoise === false ? ' (noise)' : ''}`
  return {
    header: [
      'feature',
      'rank base → head',
      'importance base [95% CI]',
      'importance head [95% CI]',
      'floor base (refit SD)',
      'floor head (refit SD)',
      'share of head',
      ...(hasDrop ? ['drop-column loss, head [95% CI]'] : []),
      'status',
    ],
    align: ['left', 'right', 'right', 'right', 'right', 'right', 'right', ...(hasDrop ? (['right'] as const) : []), 'left'],
    rows: features.map((row, i) => [
      describeName(row),
      `${row.base?.rank ?? '-'} → ${row.head?.rank ?? '-'}`,
      describeImportance(row.base),
      describeImportance(row.head),
      row.base ? formatNumber(row.base.refitSd) : '-',
      row.head ? formatNumber(row.head.refitSd) : '-',
      row.head ? formatPercent(row.head.share) : '-',
      ...(hasDrop ? [describeDrop(drops[i])] : []),
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

const sampledRoles = [
  ['train', 'Training rows sampled', 'data.max_train_rows'],
  ['holdout', 'Holdout rows sampled', 'data.max_holdout_rows'],
] as const

/** "Training rows sampled (data.max_train_rows): 200,000 → 100,000 with seed 123, on both sides." */
function describeRowSampling(base: SideSummary, head: SideSummary): string[] {
  const describe = (sample: RowSample | undefined, rows: number) =>
    sample ? `${formatCount(sample.rows)} → ${formatCount(sample.kept)} with seed ${sample.seed}` : `${formatCount(rows)} rows, not sampled`
  return sampledRoles.flatMap(([role, label, key]) => {
    const b = base.rowSampling?.[role]
    const h = head.rowSampling?.[role]
    if (!b && !h) return []
    const rows = (side: SideSummary) => (role === 'train' ? side.trainRows : side.holdoutRows)
    const same = b && h && b.rows === h.rows && b.kept === h.kept && b.seed === h.seed
    const where = same ? `${describe(b, rows(base))}, on both sides` : `base ${describe(b, rows(base))}; head ${describe(h, rows(head))}`
    return [`${label} (${key}): ${where}.`]
  })
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
      ...(settings.classes ? [['classes', settings.classes.join(', ')]] : []),
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
    findings: sortFindings(report.findings).map((finding) => describeFinding(finding, settings.task, featureSet)),
    features: tabulateFeatures(report.features),
    featureSet: {
      added: featureSet.added,
      removed: featureSet.removed,
      kindChanged: featureSet.kindChanged.map((change) => `${change.name}: ${change.base} → ${change.head}`),
      unchangedCount: changed === 0 ? headCount : null,
    },
    agreement: report.agreement ? tabulateAgreement(report.agreement) : null,
    score: sides ? summarizeScore(report) : null,
    sides: sides ? tabulateSides(sides.base, sides.head, settings.metric) : null,
    rowSampling: sides ? describeRowSampling(sides.base, sides.head) : [],
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
        // Policy settings as the policy file writes them: 0.5, not 50%.
        Object.entries(values).map(([key, value]) => [check, key, typeof value === 'number' ? formatNumber(value) : formatEvidenceValue(key, value)]),
      ),
    },
    timings: {
      header: ['stage', 'seconds'],
      align: ['left', 'right'],
      rows: Object.entries(report.timings).map(([stage, seconds]) => [stageWords[stage] ?? stage, formatNumber(seconds)]),
    },
    cacheNote: report.cache ? cacheNote(report.cache) : null,
  }
}

/** "Work units from the cache: 6 of 16 (base/refit-1, ...); measured: 10." */
function cacheNote(cache: NonNullable<GateReport['cache']>): string {
  const total = cache.reused.length + cache.measured.length + cache.uncacheable.length
  const shown = cache.reused.slice(0, 12).join(', ') + (cache.reused.length > 12 ? `, and ${cache.reused.length - 12} more` : '')
  return (
    `Work units from the cache: ${cache.reused.length} of ${total}${cache.reused.length > 0 ? ` (${shown})` : ''}; measured now: ${cache.measured.length + cache.uncacheable.length}` +
    `${cache.uncacheable.length > 0 ? ` (${cache.uncacheable.length} cannot be cached: a training command or model file in an uncommitted working tree)` : ''}.`
  )
}

/** mean ± t(0.975, n−1)·SD/√n over refits, or the single value with one refit. */
function scoreInterval(side: SideSummary): string {
  const n = side.scores.length
  if (n < 2 || !Number.isFinite(side.scoreSd)) return formatNumber(side.scoreMean)
  const half = (studentTQuantile(0.975, n - 1) * side.scoreSd) / Math.sqrt(n)
  return `${formatNumber(side.scoreMean)} [${formatNumber(side.scoreMean - half)}, ${formatNumber(side.scoreMean + half)}]`
}

function summarizeScore(report: GateReport): ScoreSummary {
  const { base, head } = report.sides!
  const { metric, higherIsBetter } = report.settings
  const pooled = pooledStandardDeviation(base.scoreSd, head.scoreSd)
  const moved = head.scoreMean - base.scoreMean
  const better = higherIsBetter ? moved > 0 : moved < 0
  const sds =
    moved === 0
      ? 'unchanged'
      : pooled > 0 && Number.isFinite(pooled)
        ? `${formatNumber(Math.abs(moved) / pooled)} reseed SDs ${better ? 'better' : 'worse'}`
        : `${better ? 'better' : 'worse'}; no reseed spread to compare with`
  const interval = base.scores.length >= 2 && head.scores.length >= 2 ? ' (95% intervals over refits)' : ''
  return {
    sentence:
      `Holdout ${metric} (${higherIsBetter ? 'higher' : 'lower'} is better): base ${scoreInterval(base)} → ` +
      `head ${scoreInterval(head)}, ${formatChange(base.scoreMean, head.scoreMean)}, ${sds}${interval}.`,
    evidenceLines: [...liftLines(report), ...dropColumnLines(report)],
  }
}

/** Lift evidence the leakage check attached to its findings, one line per feature. */
function liftLines(report: GateReport): string[] {
  const seen = new Set<string>()
  const lines: string[] = []
  for (const finding of sortFindings(report.findings)) {
    const e = finding.evidence
    if (typeof e.liftShare !== 'number' || finding.feature === undefined || seen.has(finding.feature)) continue
    seen.add(finding.feature)
    const drop =
      typeof e.dropColumnLoss === 'number'
        ? `; without it the head's loss grows by ${formatNumber(e.dropColumnLoss)}` +
          (typeof e.dropColumnLower === 'number' && typeof e.dropColumnUpper === 'number'
            ? ` [${formatNumber(e.dropColumnLower)}, ${formatNumber(e.dropColumnUpper)}]`
            : '') +
          (typeof e.dropColumnInReseedSds === 'number' ? `, ${formatNumber(e.dropColumnInReseedSds)} reseed SDs` : '')
        : ''
    lines.push(`Lift of ${finding.feature}: ${formatPercent(e.liftShare)} of the loss the base model left${drop}.`)
  }
  return lines
}

/**
 * A feature's drop-column (LOCO) result on the head, as the leakage check's refits without the
 * feature leave it in `head.dropColumn` (`loss`, `lower`, `upper`, `isAboveNoise`); read loosely so
 * a report without the field, or from an older writer, renders without it.
 */
export function readDropColumn(row: FeatureRow): { mean: number; lower: number; upper: number; isAboveNoise?: boolean } | null {
  const holders = [(row.head ?? {}) as unknown as Record<string, unknown>, row as unknown as Record<string, unknown>]
  for (const holder of holders) {
    const value = holder.dropColumn
    if (typeof value !== 'object' || value === null) continue
    const v = value as Record<string, unknown>
    const mean = typeof v.loss === 'number' ? v.loss : v.mean
    if (typeof mean !== 'number' || !Number.isFinite(mean)) continue
    const lower = typeof v.lower === 'number' ? v.lower : NaN
    const upper = typeof v.upper === 'number' ? v.upper : NaN
    return { mean, lower, upper, ...(typeof v.isAboveNoise === 'boolean' ? { isAboveNoise: v.isAboveNoise } : {}) }
  }
  return null
}

/**
 * The largest drop-column losses of features, then (one more line, when a group was refitted
 * without all its members at once) each such group's loss beside its grouped permutation importance.
 */
function dropColumnLines(report: GateReport): string[] {
  const rows = report.features.map((row) => ({ row, drop: readDropColumn(row) })).filter((x) => x.drop !== null)
  const interval = (x: { mean: number; lower: number; upper: number }) => `${formatNumber(x.mean)} [${formatNumber(x.lower)}, ${formatNumber(x.upper)}]`
  const features = rows
    .filter(({ row }) => !row.isGroup)
    .sort((a, b) => b.drop!.mean - a.drop!.mean)
    .slice(0, 3)
    .map(({ row, drop }) => `${row.name} ${interval(drop!)}`)
  const groups = rows
    .filter(({ row }) => row.isGroup)
    .sort((a, b) => b.drop!.mean - a.drop!.mean)
    .slice(0, 2)
    .map(({ row, drop }) => `${row.name} ${interval(drop!)}${drop!.isAboveNoise === false ? ' (within reseed noise)' : ''}` + (row.head ? `, permuted together ${interval(row.head)}` : ''))
  return [
    ...(features.length > 0 ? [`Drop-column loss (refitted without the feature), largest: ${features.join('; ')}.`] : []),
    ...(groups.length > 0 ? [`Drop-column loss of correlated groups (refitted without all members at once): ${groups.join('; ')}.`] : []),
  ]
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

/** The stages the gate times (report.timings keys), in words for the tables; an unknown key shows as written. */
const stageWords: Readonly<Record<string, string>> = {
  measureSeconds: 'refits, drop-column refits and importance, both sides',
  baseSingleFeatureSeconds: 'one-feature models, base',
  headSingleFeatureSeconds: 'one-feature models, head',
}
