/**
 * The starter `plumbline.yml` that `plumbline init` writes: every section present, the target,
 * task and column roles guessed from the training table (each guess says so in a comment), and
 * every optional key as a commented line at its default. Pure: the CLI reads the file and passes
 * a summary of its columns. The output parses with parsePolicy.
 */
import {
  defaultBoosting,
  defaultChecks,
  defaultData,
  defaultImportance,
  defaultMetric,
  defaultPrepare,
  defaultReport,
  defaultTopLevel,
  defaultTrainCommand,
  metricsOfTask,
} from './policy-defaults.ts'
import type { Task } from '../data/dataset.ts'
import { UserError } from '../errors.ts'

/** What `init` knows about one column of the training table. */
export interface StarterColumn {
  readonly name: string
  readonly kind: 'numeric' | 'categorical'
  /** Distinct non-missing values. */
  readonly distinct: number
  /** Missing cells. */
  readonly missing: number
  /** A different string or whole number in every row. */
  readonly looksLikeId: boolean
}

export interface StarterPolicyInput {
  /** As it should appear in the policy: relative to the repository root. */
  readonly trainPath: string
  readonly columns: readonly StarterColumn[]
  readonly rows: number
  /** The target, when the user named it (or accepted proposeTarget's); otherwise it is guessed. */
  readonly suggestedTarget?: string
  readonly task?: Task
  /** An existing holdout file (relative to the repository root): data.holdout then names it instead of a split. */
  readonly holdoutPath?: string
}

/** Names that say "this is what we predict", compared in lower case. */
const labelNames = ['target', 'label', 'y', 'outcome']

interface Guess {
  readonly name: string
  /** Why, for the comment: "named 'label'". */
  readonly reason: string
}

function nameTokens(name: string): string[] {
  return name
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter(Boolean)
}

function guessTarget(columns: readonly StarterColumn[]): Guess | undefined {
  const candidates = columns.filter((c) => !c.looksLikeId && c.distinct >= 2)
  for (const label of labelNames) {
    const exact = candidates.find((c) => c.name.trim().toLowerCase() === label)
    if (exact) return { name: exact.name, reason: `named '${exact.name}'` }
  }
  for (const label of labelNames) {
    const partial = candidates.find((c) => nameTokens(c.name).includes(label))
    if (partial) return { name: partial.name, reason: `its name contains '${label}'` }
  }
  const binary = candidates.filter((c) => c.distinct === 2)
  if (binary.length === 1) return { name: binary[0].name, reason: 'the only column with two distinct values' }
  if (binary.length > 1) {
    const last = binary[binary.length - 1]
    const others = binary.slice(0, -1).map((c) => c.name)
    return { name: last.name, reason: `the last of ${binary.length} columns with two distinct values (the others: ${others.join(', ')})` }
  }
  return undefined
}

/**
 * The column `init` proposes as the target: one named target, label, y or outcome (whole name,
 * then as a word of the name, such as `delivery_outcome`), else a column with exactly two distinct
 * values (the last one if several), never an id-like or constant column. Undefined if none fits.
 */
export function proposeTarget(columns: readonly StarterColumn[]): string | undefined {
  return guessTarget(columns)?.name
}

// ---------------------------------------------------------------------------------------------
// Writing YAML

/** A scalar as YAML: plain when it is a simple word or path, otherwise double-quoted (JSON escapes are valid YAML). */
function scalar(text: string): string {
  return /^[A-Za-z0-9_][A-Za-z0-9_./-]*$/.test(text) ? text : JSON.stringify(text)
}

function withThousands(n: number): string {
  return String(Math.round(n)).replace(/\B(?=(\d{3})+(?!\d))/g, ',')
}

function count(n: number, one: string, many: string): string {
  return `${withThousands(n)} ${n === 1 ? one : many}`
}

/** A line of the file: `text` at `indent` levels, commented out with '# ' when `isOptional`, and a trailing note. */
interface Line {
  readonly indent: number
  readonly text: string
  readonly isOptional?: boolean
  readonly note?: string
}

const key = (indent: number, text: string, note?: string): Line => ({ indent, text, ...(note ? { note } : {}) })
const optional = (indent: number, text: string, note?: string): Line => ({ indent, text, isOptional: true, ...(note ? { note } : {}) })

/** Renders one block, lining up the notes of its lines (up to a width, so long names do not push them away). */
function renderBlock(lines: readonly Line[]): string {
  const body = lines.map((line) => `${'  '.repeat(line.indent)}${line.isOptional ? '# ' : ''}${line.text}`)
  const width = Math.min(44, Math.max(0, ...body.filter((_, i) => lines[i].note).map((b) => b.length)))
  return body.map((b, i) => (lines[i].note ? `${b.padEnd(width)}  # ${lines[i].note}` : b)).join('\n')
}

function inferTask(target: StarterColumn | undefined): { task: Task; note: string } {
  if (!target) return { task: 'binary', note: 'guessed: set binary or regression once the target is set' }
  if (target.distinct === 2) return { task: 'binary', note: `guessed: '${target.name}' has two distinct values` }
  if (target.kind === 'numeric') {
    return { task: 'regression', note: `guessed: '${target.name}' is numeric with ${withThousands(target.distinct)} distinct values` }
  }
  return {
    task: 'binary',
    note: `'${target.name}' has ${withThousands(target.distinct)} categories; plumbline handles two-class and numeric targets only`,
  }
}

function taskNote(task: Task, target: StarterColumn | undefined): string | undefined {
  if (!target) return undefined
  if (task === 'binary' && target.distinct !== 2) return `check this: '${target.name}' has ${withThousands(target.distinct)} distinct values, binary needs two`
  if (task === 'regression' && target.kind !== 'numeric') return `check this: '${target.name}' is not numeric`
  return undefined
}

function describeColumn(column: StarterColumn, rows: number): { role: string; note: string } {
  const missing = column.missing > 0 ? `, ${withThousands(column.missing)} missing` : ''
  if (column.looksLikeId) return { role: 'id', note: `guessed: a different value in each of the ${withThousands(rows)} rows` }
  if (column.distinct === 0) return { role: 'ignore', note: 'guessed: every value is missing' }
  if (column.distinct === 1) return { role: 'ignore', note: `guessed: the same value in every row${missing}` }
  return { role: column.kind, note: `${count(column.distinct, 'distinct value', 'distinct values')}${missing}` }
}

/** Where a holdout file beside the training table would be: train.csv -> holdout.csv in the same folder. */
export function holdoutPathFor(trainPath: string): string {
  const slash = trainPath.lastIndexOf('/')
  const dir = trainPath.slice(0, slash + 1)
  const base = trainPath.slice(slash + 1)
  return /train/i.test(base) ? dir + base.replace(/train/i, 'holdout') : `${dir}holdout.csv`
}

/**
 * The starter policy for a training table, as YAML text with comments. Throws UserError when
 * `suggestedTarget` is not one of the columns. Cost linear in the number of columns.
 */
export function renderStarterPolicy(input: StarterPolicyInput): string {
  const { trainPath, columns, rows } = input
  const guess = guessTarget(columns)
  if (input.suggestedTarget !== undefined && !columns.some((c) => c.name === input.suggestedTarget)) {
    throw new UserError(
      `The target '${input.suggestedTarget}' is not a column of ${trainPath} (columns: ${columns.map((c) => c.name).join(', ')}).`,
      `Name one of the columns of ${trainPath} as the target.`,
    )
  }
  const targetName = input.suggestedTarget ?? guess?.name
  const target = columns.find((c) => c.name === targetName)
  const inferred = inferTask(target)
  const task = input.task ?? inferred.task
  const features = columns.filter((c) => c !== target)
  const described = features.map((c) => ({ column: c, ...describeColumn(c, rows) }))
  const idColumn = described.find((d) => d.role === 'id')?.column
  const numeric = described.filter((d) => d.role === 'numeric').map((d) => d.column.name)
  const usable = described.filter((d) => d.role === 'numeric' || d.role === 'categorical').map((d) => d.column.name)
  const example = (names: readonly string[], fallback: string[]) => `[${(names.length >= 2 ? names.slice(0, 2) : fallback).map(scalar).join(', ')}]`

  const targetNote = !target
    ? 'no column looked like a label: set the column to predict and delete its line under data.columns'
    : input.suggestedTarget !== undefined && input.suggestedTarget !== guess?.name
      ? 'the column to predict'
      : `guessed: ${guess!.reason}`

  const header = [
    '# plumbline policy: what the gate measures on each pull request, and when it warns or blocks.',
    `# Written by 'plumbline init' from ${trainPath} (${count(rows, 'row', 'rows')}, ${count(columns.length, 'column', 'columns')}).`,
    '# Lines marked "guessed" come from the data: check them. A line starting with "# key:" is an',
    "# optional key at its default; remove the '# ' to change it. docs/policy.md describes every key.",
  ].join('\n')

  const top = renderBlock([
    key(0, `version: 1`),
    key(0, `task: ${task}`, input.task ? taskNote(task, target) : inferred.note),
    key(0, `target: ${target ? scalar(target.name) : 'SET_TARGET_COLUMN'}`, targetNote),
    key(0, `seed: ${defaultTopLevel.seed}`, 'every random choice of a run derives from it'),
  ])

  const holdout = input.holdoutPath
  // Roles the reader infers from the values (numeric, categorical) are shown as comments, so that a
  // pull request that removes or adds a column need not edit the policy; only an id and columns to
  // ignore, which cannot be inferred, are written as keys.
  const declared = described.filter((d) => d.role === 'id' || d.role === 'ignore')
  const data = renderBlock([
    key(0, 'data:'),
    key(1, `train: ${scalar(trainPath)}`),
    holdout
      ? key(1, `holdout: ${scalar(holdout)}`, 'found beside the training table')
      : optional(1, `holdout: ${scalar(holdoutPathFor(trainPath))}`, 'a separate holdout file, instead of split'),
    (holdout ? optional : key)(1, 'split:', holdout ? 'instead of holdout: hold out part of data.train' : 'hold out part of data.train'),
    (holdout ? optional : key)(2, `fraction: ${defaultData.split.fraction}`),
    idColumn && !holdout
      ? key(2, `by: ${scalar(idColumn.name)}`, 'guessed: hashing the id holds out the same rows on both sides')
      : optional(2, idColumn ? `by: ${scalar(idColumn.name)}` : 'by: <id column>', 'hash an id so both sides hold out the same rows'),
    optional(1, `reference: ${defaultData.reference.kind}`, 'train, holdout or a file: where permutation draws come from'),
    optional(1, `unlabeled: ${scalar(holdoutPathFor(trainPath).replace(/holdout/i, 'unlabeled'))}`, 'rows without the target'),
    optional(1, `max_train_rows: ${defaultData.maxTrainRows}`, 'above it, refits train on a seeded sample of the rows'),
    optional(1, `max_holdout_rows: ${defaultData.maxHoldoutRows}`, 'above it, both sides are scored on the same seeded sample'),
    features.length > 0 ? key(1, 'columns:', 'numeric, categorical, id or ignore; others are inferred') : key(1, 'columns: {}', 'numeric, categorical, id or ignore'),
    ...described.map((d) => (declared.includes(d) ? key : optional)(2, `${scalar(d.column.name)}: ${d.role}`, declared.includes(d) ? d.note : `inferred: ${d.note}`)),
  ])

  const prepare = renderBlock([
    optional(0, 'prepare:', "a command run in each side's checkout before the data is read"),
    optional(1, 'command: <shell command>'),
    optional(1, `timeout_seconds: ${defaultPrepare.timeoutSeconds}`),
  ])

  const model = renderBlock([
    key(0, 'model:', 'exactly one of builtin, onnx, train'),
    key(1, 'builtin:'),
    key(2, 'learner: gradient-boosting', 'or linear, which reads l2 only'),
    optional(2, `trees: ${defaultBoosting.trees}`),
    optional(2, `max_depth: ${defaultBoosting.maxDepth}`),
    optional(2, `learning_rate: ${defaultBoosting.learningRate}`),
    optional(2, `min_rows_per_leaf: ${defaultBoosting.minRowsPerLeaf}`),
    optional(2, `l2: ${defaultBoosting.l2}`),
    optional(2, `row_subsample: ${defaultBoosting.rowSubsample}`),
    optional(2, `column_subsample: ${defaultBoosting.columnSubsample}`),
    optional(2, `max_bins: ${defaultBoosting.maxBins}`),
    optional(1, 'onnx:', "instead of builtin: a model file in each side's checkout"),
    optional(2, 'path: <path or glob>'),
    optional(2, `features: ${example(usable, ['column_a', 'column_b'])}`, 'input order, for models without input names'),
    optional(2, 'positive_class: <label or index>', 'binary only'),
    optional(1, 'train:', 'instead of builtin: your command writes an ONNX model to $PLUMBLINE_OUTPUT'),
    optional(2, 'command: <shell command>'),
    optional(2, `timeout_seconds: ${defaultTrainCommand.timeoutSeconds}`),
    optional(2, `parallel: ${defaultTrainCommand.parallel}`),
  ])

  const metrics = metricsOfTask(task)
  const importance = renderBlock([
    key(0, 'importance:'),
    optional(1, `metric: ${defaultMetric[task]}`, metrics.join(', ')),
    optional(1, `draws: ${defaultImportance.draws}`, 'draws per feature per refit'),
    optional(1, `refits: ${defaultImportance.refits}`, 'reseeded refits per side'),
    optional(1, `reference_rows: ${defaultImportance.referenceRows}`),
    optional(1, `evaluation_rows: ${defaultImportance.evaluationRows}`),
    optional(1, `drop_column_top: ${defaultImportance.dropColumnTop}`, 'features per side also refitted without (drop-column)'),
    optional(1, 'groups:', 'columns permuted together and reported as one'),
    optional(2, `group_name: ${example(numeric, ['column_a', 'column_b'])}`),
    optional(1, `group_threshold: ${defaultImportance.groupThreshold}`, 'automatic groups: numeric columns with |Spearman| at or above this'),
  ])

  const { leakage, rankShift, score, holdoutRows, sensitivity, gain, slices, correlatedGroups } = defaultChecks
  const checks = renderBlock([
    key(0, 'checks:'),
    key(1, 'leakage:', 'one feature carries the model'),
    key(2, `action: ${leakage.action}`, 'block, warn or off'),
    optional(2, `dominance_share: ${leakage.dominanceShare}`),
    optional(2, `runner_up_ratio: ${leakage.runnerUpRatio}`),
    optional(2, `single_feature_power: ${leakage.singleFeaturePower}`),
    optional(2, `relative_power: ${leakage.relativePower}`),
    optional(2, `lift_warn: ${leakage.liftWarn}`, 'docs/leak-rule.md'),
    optional(2, `lift_block: ${leakage.liftBlock}`),
    optional(2, `slice_warn_power: ${leakage.sliceWarnPower}`),
    optional(2, 'reviewed_columns: []', 'columns a person checked are known at prediction time'),
    key(1, 'rank_shift:', 'features change places between base and head'),
    key(2, `action: ${rankShift.action}`),
    optional(2, `false_discovery_rate: ${rankShift.falseDiscoveryRate}`),
    optional(2, `min_positions: ${rankShift.minPositions}`),
    optional(2, `agreement_percentile: ${rankShift.agreementPercentile}`),
    key(1, 'score:', 'the holdout score gets worse'),
    key(2, `action: ${score.action}`),
    optional(2, `tolerance: ${score.tolerance}`, 'in metric units'),
    optional(2, `alpha: ${score.alpha}`),
    key(1, 'holdout_rows:', 'the holdout rows differ between base and head'),
    key(2, `action: ${holdoutRows.action}`),
    key(1, 'sensitivity:', 'how much predictions move when a feature is replaced (no labels needed)'),
    key(2, `action: ${sensitivity.action}`),
    optional(2, `false_discovery_rate: ${sensitivity.falseDiscoveryRate}`),
    optional(2, `min_relative_change: ${sensitivity.minRelativeChange}`),
    optional(2, `unlabeled_ratio: ${sensitivity.unlabeledRatio}`, 'data.unlabeled against the holdout'),
    optional(2, `min_share: ${sensitivity.minShare}`),
    key(1, 'gain:', 'the built-in trees split on a feature that does not help on the holdout'),
    key(2, `action: ${gain.action}`),
    optional(2, `top_ranks: ${gain.topRanks}`),
    optional(2, `min_gain_share: ${gain.minGainShare}`),
    optional(2, `min_distinct: ${gain.minDistinct}`),
    key(1, 'correlated_groups:', 'a feature that looks unimportant alone while its correlated group matters'),
    key(2, `action: ${correlatedGroups.action}`, 'warn, info or off (off: no automatic groups)'),
    key(1, 'slices:', 'the policy slices below: score and importance on their rows'),
    key(2, `action: ${slices.action}`),
    optional(2, `min_rows: ${slices.minRows}`, 'smaller slices are reported as too small'),
  ])

  const sliceBlock = renderBlock([
    optional(0, 'slices:', 'named parts of the holdout, judged on their own'),
    optional(1, '- name: one depot'),
    optional(2, 'where: { column: a_column, equals: a_value }', 'also in, at_least, below, between, is_missing; all_of / any_of'),
  ])

  const report = renderBlock([key(0, 'report:'), optional(1, `max_table_rows: ${defaultReport.maxTableRows}`)])

  return `${[header, top, data, prepare, model, importance, checks, sliceBlock, report].join('\n\n')}\n`
}
