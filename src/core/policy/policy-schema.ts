/**
 * `policySchema`: the zod schema of a `plumbline.yml` document (snake_case keys, every scalar
 * arriving as the text written in the file), ending in a transform to `GateConfig`. It holds every
 * rule that needs the policy alone: types, ranges, unknown keys, one of builtin/onnx/train, one of
 * holdout/split, groups that repeat a column or name the target. Rules that need the data (does a
 * named column exist?) are in `checkPolicyAgainstColumns` (parse-policy.ts).
 */
import { z } from 'zod'
import type { DeclaredColumnRole, GateConfig, HoldoutConfig, ModelConfig, ReferenceConfig, SliceFilter } from '../config.ts'
import type { MetricName } from '../metrics/metric.ts'
import { formatKeyPath } from './format-key-path.ts'
import {
  deepFreeze,
  defaultBoosting,
  defaultChecks,
  defaultData,
  defaultImportance,
  defaultMetric,
  defaultPrepare,
  defaultReport,
  defaultTopLevel,
  defaultTrainCommand,
  metricTasks,
  metricsOfTask,
  uint32Max,
} from './policy-defaults.ts'

// ---------------------------------------------------------------------------------------------
// Schema building blocks. Every error message is the phrase for what is allowed ("a whole number
// from 1 to 1000"); parsePolicy puts it into "<key path> must be <phrase>; got '<value>'."

/** Issues raised by the rules below carry `params.kind = 'rule'`: their message is a whole sentence. */
export interface PolicyRuleParams {
  readonly kind: 'rule'
  /** What the user should do. */
  readonly fix: string
  /** Path suffix (relative to the issue's path) of the node to point at, when not the key itself. */
  readonly at?: readonly (string | number)[]
  /** Point at the value rather than the key (the rule is about the value written). */
  readonly pointAtValue?: boolean
}

type RuleContext = { addIssue(issue: { code: 'custom'; message: string; path: PropertyKey[]; params: PolicyRuleParams }): void }

function rule(ctx: RuleContext, path: PropertyKey[], message: string, fix: string, at?: (string | number)[], pointAtValue?: boolean): void {
  const params: PolicyRuleParams = { kind: 'rule', fix, ...(at ? { at } : {}), ...(pointAtValue ? { pointAtValue } : {}) }
  ctx.addIssue({ code: 'custom', message, path, params })
}

const numberText = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/

/** YAML arrives as text (failsafe schema); numbers are read here, strictly (no hex, no '1_000'). */
function numberFromText(raw: unknown): unknown {
  return typeof raw === 'string' && numberText.test(raw.trim()) ? Number(raw) : raw
}

function wholeNumber(min: number, max?: number) {
  const phrase = max === undefined ? `a whole number of at least ${min}` : `a whole number from ${min} to ${max}`
  const base = z.number({ error: phrase }).int({ error: phrase }).min(min, { error: phrase })
  return z.preprocess(numberFromText, max === undefined ? base : base.max(max, { error: phrase }))
}

interface Bounds {
  readonly above?: number
  readonly atLeast?: number
  readonly below?: number
  readonly atMost?: number
}

function realNumber(bounds: Bounds) {
  const parts = [
    bounds.above !== undefined ? `above ${bounds.above}` : bounds.atLeast !== undefined ? `at least ${bounds.atLeast}` : '',
    bounds.below !== undefined ? `below ${bounds.below}` : bounds.atMost !== undefined ? `at most ${bounds.atMost}` : '',
  ].filter(Boolean)
  const phrase = parts.length === 0 ? 'a number' : parts.length === 1 && bounds.atLeast !== undefined ? `a number of at least ${bounds.atLeast}` : `a number ${parts.join(' and ')}`
  let schema = z.number({ error: phrase })
  if (bounds.above !== undefined) schema = schema.gt(bounds.above, { error: phrase })
  if (bounds.atLeast !== undefined) schema = schema.gte(bounds.atLeast, { error: phrase })
  if (bounds.below !== undefined) schema = schema.lt(bounds.below, { error: phrase })
  if (bounds.atMost !== undefined) schema = schema.lte(bounds.atMost, { error: phrase })
  return z.preprocess(numberFromText, schema)
}

function text(phrase: string) {
  return z.string({ error: phrase }).min(1, { error: phrase })
}

function oneOf<const T extends readonly [string, ...string[]]>(values: T) {
  return z.enum(values, { error: `one of ${values.join(', ')}` })
}

/** A YAML mapping with exactly these keys allowed. An empty value (`checks:`) counts as `{}`. */
function mapping<T extends z.core.$ZodLooseShape>(shape: T, phrase = 'a mapping of keys') {
  return z.preprocess((raw) => (raw === null ? {} : raw), z.strictObject(shape, { error: phrase }))
}

function nameList(phrase: string) {
  return z.array(text('a column name'), { error: phrase }).min(1, { error: phrase })
}

const checkAction = oneOf(['block', 'warn', 'off'])
const columnRoles = ['numeric', 'categorical', 'id', 'ignore'] as const satisfies readonly DeclaredColumnRole[]
const metricNames = Object.keys(metricTasks) as [MetricName, ...MetricName[]]

// ---------------------------------------------------------------------------------------------
// The document

const splitSchema = mapping({
  fraction: realNumber({ above: 0, below: 1 }).default(defaultData.split.fraction),
  by: text('a column name').optional(),
})

const dataSchema = mapping({
  train: text('a file path'),
  holdout: text('a file path').optional(),
  split: splitSchema.optional(),
  reference: text('train, holdout or a file path').default(defaultData.reference.kind),
  unlabeled: text('a file path').optional(),
  max_train_rows: wholeNumber(20).default(defaultData.maxTrainRows),
  max_holdout_rows: wholeNumber(10).default(defaultData.maxHoldoutRows),
  columns: z.preprocess((raw) => (raw === null ? {} : raw), z.record(z.string(), oneOf(columnRoles), { error: 'a mapping of column names to roles' })).default({}),
}, 'a mapping with train and one of holdout, split').superRefine((data, ctx) => {
  if (data.holdout !== undefined && data.split !== undefined) {
    rule(ctx, [], "has both 'holdout' and 'split'; use one.", "Delete 'split:' to use the holdout file, or delete 'holdout:' to carve the holdout out of data.train.", ['split'])
  } else if (data.holdout === undefined && data.split === undefined) {
    rule(ctx, [], 'needs one of holdout, split; got neither.', "Add 'holdout: <path>' under data, or 'split:' with 'fraction: 0.2' to carve the holdout out of data.train.")
  }
})

const prepareSchema = mapping({
  command: text('a shell command'),
  timeout_seconds: wholeNumber(1, 86_400).default(defaultPrepare.timeoutSeconds),
})

/** Keys of `model.builtin` that only gradient boosting reads. */
export const boostingOnlyKeys = ['trees', 'max_depth', 'learning_rate', 'min_rows_per_leaf', 'row_subsample', 'column_subsample', 'max_bins'] as const

const builtinSchema = z.preprocess(
  (raw, ctx) => {
    if (raw !== null && typeof raw === 'object' && (raw as { learner?: unknown }).learner === 'linear') {
      for (const key of boostingOnlyKeys) {
        if (Object.hasOwn(raw, key)) {
          rule(ctx, [key], 'applies to learner gradient-boosting only; learner is linear.', `Delete '${key}:' from model.builtin, or set 'learner: gradient-boosting'.`)
        }
      }
    }
    return raw === null ? {} : raw
  },
  z.strictObject(
    {
      learner: oneOf(['gradient-boosting', 'linear']),
      trees: wholeNumber(1, 5000).default(defaultBoosting.trees),
      max_depth: wholeNumber(1, 16).default(defaultBoosting.maxDepth),
      learning_rate: realNumber({ above: 0, atMost: 1 }).default(defaultBoosting.learningRate),
      min_rows_per_leaf: wholeNumber(1).default(defaultBoosting.minRowsPerLeaf),
      l2: realNumber({ atLeast: 0 }).default(defaultBoosting.l2),
      row_subsample: realNumber({ above: 0, atMost: 1 }).default(defaultBoosting.rowSubsample),
      column_subsample: realNumber({ above: 0, atMost: 1 }).default(defaultBoosting.columnSubsample),
      max_bins: wholeNumber(2, 255).default(defaultBoosting.maxBins),
    },
    { error: 'a mapping of keys' },
  ),
)

const onnxSchema = mapping({
  path: text('a file path or glob'),
  features: nameList('a list of column names').optional(),
  positive_class: text('a class label or probability column').optional(),
})

const trainSchema = mapping({
  command: text('a shell command'),
  timeout_seconds: wholeNumber(1, 86_400).default(defaultTrainCommand.timeoutSeconds),
  parallel: wholeNumber(1, 64).default(defaultTrainCommand.parallel),
})

const modelKinds = ['builtin', 'onnx', 'train'] as const

const modelSchema = mapping({
  builtin: builtinSchema.optional(),
  onnx: onnxSchema.optional(),
  train: trainSchema.optional(),
}, 'a mapping with one of builtin, onnx, train').superRefine((model, ctx) => {
  const given = modelKinds.filter((kind) => model[kind] !== undefined)
  if (given.length === 0) {
    rule(ctx, [], 'needs one of builtin, onnx, train; got none.', "Add 'builtin:' with 'learner: gradient-boosting' under model, or 'onnx:' or 'train:' (docs/policy.md shows each).")
  } else if (given.length > 1) {
    rule(ctx, [], `has both '${given[0]}' and '${given[1]}'; use one of builtin, onnx, train.`, `Delete '${given[0]}:' or '${given[1]}:' from model.`, [given[1]])
  }
})

const importanceSchema = mapping({
  metric: oneOf(metricNames).optional(),
  draws: wholeNumber(1, 1000).default(defaultImportance.draws),
  refits: wholeNumber(1, 100).default(defaultImportance.refits),
  reference_rows: wholeNumber(1).default(defaultImportance.referenceRows),
  evaluation_rows: wholeNumber(2).default(defaultImportance.evaluationRows),
  drop_column_top: wholeNumber(0, 100).default(defaultImportance.dropColumnTop),
  groups: z.preprocess(
    (raw) => (raw === null ? {} : raw),
    z.record(z.string(), nameList('a list of column names, such as [distance_km, stop_count]'), { error: 'a mapping of group names to lists of columns' }),
  ).default({}),
  group_threshold: realNumber({ above: 0, atMost: 1 }).default(defaultImportance.groupThreshold),
})

const checksSchema = mapping({
  leakage: mapping({
    action: checkAction.default(defaultChecks.leakage.action),
    dominance_share: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.dominanceShare),
    runner_up_ratio: realNumber({ atLeast: 1 }).default(defaultChecks.leakage.runnerUpRatio),
    single_feature_power: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.singleFeaturePower),
    relative_power: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.relativePower),
    lift_warn: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.liftWarn),
    lift_block: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.liftBlock),
    slice_warn_power: realNumber({ above: 0, atMost: 1 }).default(defaultChecks.leakage.sliceWarnPower),
    reviewed_columns: z.preprocess(
      (raw) => (raw === null ? [] : raw),
      z.array(text('a column name'), { error: 'a list of column names, such as [roadworks_km]' }),
    ).default([]),
  }).prefault({}),
  rank_shift: mapping({
    action: checkAction.default(defaultChecks.rankShift.action),
    false_discovery_rate: realNumber({ above: 0, below: 1 }).default(defaultChecks.rankShift.falseDiscoveryRate),
    min_positions: wholeNumber(1).default(defaultChecks.rankShift.minPositions),
    agreement_percentile: realNumber({ above: 0, below: 100 }).default(defaultChecks.rankShift.agreementPercentile),
  }).prefault({}),
  score: mapping({
    action: checkAction.default(defaultChecks.score.action),
    tolerance: realNumber({ atLeast: 0 }).default(defaultChecks.score.tolerance),
    alpha: realNumber({ above: 0, below: 1 }).default(defaultChecks.score.alpha),
  }).prefault({}),
  holdout_rows: mapping({
    action: checkAction.default(defaultChecks.holdoutRows.action),
  }).prefault({}),
  sensitivity: mapping({
    action: checkAction.default(defaultChecks.sensitivity.action),
    false_discovery_rate: realNumber({ above: 0, below: 1 }).default(defaultChecks.sensitivity.falseDiscoveryRate),
    min_relative_change: realNumber({ atLeast: 0, below: 1 }).default(defaultChecks.sensitivity.minRelativeChange),
    unlabeled_ratio: realNumber({ above: 1 }).default(defaultChecks.sensitivity.unlabeledRatio),
    min_share: realNumber({ atLeast: 0, below: 1 }).default(defaultChecks.sensitivity.minShare),
  }).prefault({}),
  gain: mapping({
    action: checkAction.default(defaultChecks.gain.action),
    top_ranks: wholeNumber(1).default(defaultChecks.gain.topRanks),
    min_gain_share: realNumber({ atLeast: 0, below: 1 }).default(defaultChecks.gain.minGainShare),
    min_distinct: wholeNumber(2).default(defaultChecks.gain.minDistinct),
  }).prefault({}),
  correlated_groups: mapping({
    action: oneOf(['warn', 'info', 'off']).default(defaultChecks.correlatedGroups.action),
  }).prefault({}),
  slices: mapping({
    action: checkAction.default(defaultChecks.slices.action),
    min_rows: wholeNumber(1).default(defaultChecks.slices.minRows),
  }).prefault({}),
})

// A slice's filter: data, not a formula. One column comparison, or all_of / any_of a list of filters.
const comparisons = ['equals', 'in', 'at_least', 'below', 'between', 'is_missing'] as const
interface FilterDocument {
  column?: string
  equals?: string
  in?: string[]
  at_least?: number
  below?: number
  between?: number[]
  is_missing?: 'true' | 'false'
  all_of?: FilterDocument[]
  any_of?: FilterDocument[]
}
const filterKeys: readonly string[] = ['column', ...comparisons, 'all_of', 'any_of']

/** The shape rules of one filter, on the raw mapping; skipped when it has unknown keys (those are reported instead). */
function checkFilterShape(raw: Record<string, unknown>, ctx: RuleContext): void {
  const given = comparisons.filter((c) => raw[c] !== undefined)
  const lists = (['all_of', 'any_of'] as const).filter((c) => raw[c] !== undefined)
  const hasColumn = raw.column !== undefined
  const allowed = `column with one of ${comparisons.join(', ')}; or all_of or any_of with a list of filters`
  if (lists.length > 0 && (hasColumn || given.length > 0 || lists.length > 1)) {
    rule(ctx, [], `mixes ${[...lists, ...(hasColumn ? ['column'] : []), ...given].join(', ')}; a filter is ${allowed}.`, 'Put each comparison in its own filter under all_of or any_of.')
  } else if (lists.length === 0 && !hasColumn) {
    rule(ctx, [], `names no column; a filter is ${allowed}.`, "Add 'column: <name>' and one comparison, such as 'equals: harbour'.")
  } else if (lists.length === 0 && given.length !== 1) {
    rule(ctx, [], `has ${given.length === 0 ? 'no comparison' : `${given.length} comparisons (${given.join(', ')})`}; a filter is ${allowed}.`,
      given.length === 0 ? "Add one comparison, such as 'equals: harbour' or 'at_least: 10'." : 'Keep one comparison here and put the others in their own filters under all_of.')
  } else if (Array.isArray(raw.between) && raw.between.length === 2) {
    const [low, high] = raw.between.map(numberFromText)
    if (typeof low === 'number' && typeof high === 'number' && !(low < high)) {
      rule(ctx, ['between'], `needs low below high; got [${low}, ${high}].`, 'Write between: [low, high] with low < high (low included, high excluded).', undefined, true)
    }
  }
}

const filterSchema: z.ZodType<FilterDocument> = z.lazy(() =>
  z.preprocess(
    (raw, ctx) => {
      if (raw !== null && typeof raw === 'object' && !Array.isArray(raw) && Object.keys(raw).every((key) => filterKeys.includes(key))) {
        checkFilterShape(raw as Record<string, unknown>, ctx)
      }
      return raw === null ? {} : raw
    },
    z.strictObject(
      {
        column: text('a column name').optional(),
        equals: text('a value').optional(),
        in: z.array(text('a value'), { error: 'a list of values' }).min(1, { error: 'a list of values' }).optional(),
        at_least: realNumber({}).optional(),
        below: realNumber({}).optional(),
        between: z.array(realNumber({}), { error: 'a list of two numbers [low, high]' }).length(2, { error: 'a list of two numbers [low, high]' }).optional(),
        is_missing: oneOf(['true', 'false']).optional(),
        all_of: z.array(filterSchema, { error: 'a list of filters' }).min(1, { error: 'a list of filters' }).optional(),
        any_of: z.array(filterSchema, { error: 'a list of filters' }).min(1, { error: 'a list of filters' }).optional(),
      },
      { error: 'a mapping with column and one comparison, or all_of or any_of' },
    ),
  ),
)

const slicesSchema = z.preprocess(
  (raw) => (raw === null ? [] : raw),
  z.array(mapping({ name: text('a slice name'), where: filterSchema }, 'a mapping with name and where'), { error: 'a list of slices, each with name and where' }),
).superRefine((slices, ctx) => {
  slices.forEach((slice, index) => {
    if (slices.findIndex((s) => s.name === slice.name) !== index) {
      rule(ctx, [index, 'name'], `repeats the slice name '${slice.name}'; each slice needs its own name.`, 'Rename one of the two slices.', undefined, true)
    }
  })
})

const reportSchema = mapping({
  max_table_rows: wholeNumber(1, 1000).default(defaultReport.maxTableRows),
})

const documentSchema = mapping({
  version: z.preprocess(numberFromText, z.literal(1, { error: '1' })),
  task: oneOf(['binary', 'regression', 'multiclass']),
  target: text('a column name'),
  seed: wholeNumber(0, uint32Max).default(defaultTopLevel.seed),
  data: dataSchema,
  prepare: prepareSchema.optional(),
  model: modelSchema,
  importance: importanceSchema.prefault({}),
  checks: checksSchema.prefault({}),
  slices: slicesSchema.default([]),
  report: reportSchema.prefault({}),
}, 'a mapping of keys such as version, task, target')

type PolicyDocument = z.output<typeof documentSchema>

/** Rules across sections: they run once every section is valid on its own. */
function checkAcrossSections(policy: PolicyDocument, ctx: RuleContext): void {
  const { task, target } = policy
  const roles = policy.data.columns
  const allowed = metricsOfTask(task)
  if (policy.importance.metric !== undefined && !allowed.includes(policy.importance.metric)) {
    rule(ctx, ['importance', 'metric'], `must be one of ${allowed.join(', ')} for task ${task}; got '${policy.importance.metric}'.`,
      `Set importance.metric to one of ${allowed.join(', ')}, or delete the line to use the default for task ${task} (${defaultMetric[task]}).`, undefined, true)
  }
  if (Object.hasOwn(roles, target)) {
    rule(ctx, ['data', 'columns', target], `gives a role to the target column '${target}'; the target is named by 'target:' alone.`,
      `Delete the line '${target}: ${roles[target]}' from data.columns.`)
  }
  if (policy.data.split?.by === target) {
    rule(ctx, ['data', 'split', 'by'], `names the target column '${target}'; split by an id column instead.`,
      'Set data.split.by to a column that identifies rows (such as an order or parcel id), or delete the line.')
  }
  const checkNames = (path: (string | number)[], names: readonly string[], what: string) => {
    const keyPath = formatKeyPath(path)
    names.forEach((name, index) => {
      if (names.indexOf(name) !== index) {
        rule(ctx, path, `lists '${name}' twice; ${what} names each column once.`, `Delete the second '${name}' from ${keyPath}.`, [index])
      } else if (name === target) {
        rule(ctx, path, `lists '${name}', which is the target; the target cannot be a feature.`, `Remove '${name}' from ${keyPath}.`, [index])
      } else if (roles[name] === 'id' || roles[name] === 'ignore') {
        rule(ctx, path, `lists '${name}', which data.columns marks as ${roles[name]}; only features can be listed here.`,
          `Remove '${name}' from ${keyPath}, or give it the role numeric or categorical in data.columns.`, [index])
      }
    })
  }
  for (const [group, members] of Object.entries(policy.importance.groups)) checkNames(['importance', 'groups', group], members, 'a group')
  if (policy.model.onnx?.features) checkNames(['model', 'onnx', 'features'], policy.model.onnx.features, 'the list')
  if (task === 'multiclass' && policy.model.builtin?.learner === 'linear') {
    rule(ctx, ['model', 'builtin', 'learner'], 'is linear, which has no multiclass fit in plumbline; task is multiclass.',
      "Set 'learner: gradient-boosting' (softmax boosting, one tree per class per round), or gate a model of your own through model.onnx or model.train.")
  }
  if (policy.model.onnx?.positive_class !== undefined && task !== 'binary') {
    rule(ctx, ['model', 'onnx', 'positive_class'], `applies to task binary only; task is ${task}.`, "Delete 'positive_class:' from model.onnx, or set 'task: binary'.")
  }
}

function nullPrototype<T>(entries: Iterable<readonly [string, T]>): Record<string, T> {
  const result: Record<string, T> = Object.create(null)
  for (const [key, value] of entries) result[key] = value
  return result
}

function toModelConfig(model: PolicyDocument['model']): ModelConfig {
  if (model.builtin) {
    const b = model.builtin
    return {
      kind: 'builtin',
      learner: b.learner,
      trees: b.trees,
      maxDepth: b.max_depth,
      learningRate: b.learning_rate,
      minRowsPerLeaf: b.min_rows_per_leaf,
      l2: b.l2,
      rowSubsample: b.row_subsample,
      columnSubsample: b.column_subsample,
      maxBins: b.max_bins,
    }
  }
  if (model.onnx) {
    const { path, features, positive_class } = model.onnx
    return {
      kind: 'onnx',
      path,
      ...(features ? { features } : {}),
      ...(positive_class !== undefined ? { positiveClass: /^\d+$/.test(positive_class) ? Number(positive_class) : positive_class } : {}),
    }
  }
  // The model rule guarantees exactly one kind, so this is `train`.
  const t = model.train!
  return { kind: 'train', command: t.command, timeoutSeconds: t.timeout_seconds, parallel: t.parallel }
}

function toSliceFilter(f: FilterDocument): SliceFilter {
  if (f.all_of) return { allOf: f.all_of.map(toSliceFilter) }
  if (f.any_of) return { anyOf: f.any_of.map(toSliceFilter) }
  return {
    column: f.column!,
    ...(f.equals !== undefined ? { equals: f.equals } : {}),
    ...(f.in !== undefined ? { in: f.in } : {}),
    ...(f.at_least !== undefined ? { atLeast: f.at_least } : {}),
    ...(f.below !== undefined ? { below: f.below } : {}),
    ...(f.between !== undefined ? { between: [f.between[0], f.between[1]] as const } : {}),
    ...(f.is_missing !== undefined ? { isMissing: f.is_missing === 'true' } : {}),
  }
}

function toGateConfig(policy: PolicyDocument): GateConfig {
  const { data, importance, checks } = policy
  const reference: ReferenceConfig =
    data.reference === 'train' || data.reference === 'holdout' ? { kind: data.reference } : { kind: 'file', path: data.reference }
  const holdout: HoldoutConfig = data.split
    ? { kind: 'split', fraction: data.split.fraction, ...(data.split.by !== undefined ? { by: data.split.by } : {}) }
    : { kind: 'file', path: data.holdout! }
  return deepFreeze({
    version: 1,
    task: policy.task,
    target: policy.target,
    seed: policy.seed,
    data: {
      train: data.train,
      holdout,
      reference,
      ...(data.unlabeled !== undefined ? { unlabeled: data.unlabeled } : {}),
      columns: nullPrototype(Object.entries(data.columns)),
      maxTrainRows: data.max_train_rows,
      maxHoldoutRows: data.max_holdout_rows,
    },
    ...(policy.prepare ? { prepare: { command: policy.prepare.command, timeoutSeconds: policy.prepare.timeout_seconds } } : {}),
    model: toModelConfig(policy.model),
    importance: {
      metric: importance.metric ?? defaultMetric[policy.task],
      draws: importance.draws,
      refits: importance.refits,
      referenceRows: importance.reference_rows,
      evaluationRows: importance.evaluation_rows,
      dropColumnTop: importance.drop_column_top,
      groups: nullPrototype(Object.entries(importance.groups)),
      groupThreshold: importance.group_threshold,
    },
    checksAsWritten: checks,
    checks: {
      leakage: {
        action: checks.leakage.action,
        dominanceShare: checks.leakage.dominance_share,
        runnerUpRatio: checks.leakage.runner_up_ratio,
        singleFeaturePower: checks.leakage.single_feature_power,
        relativePower: checks.leakage.relative_power,
        liftWarn: checks.leakage.lift_warn,
        liftBlock: checks.leakage.lift_block,
        sliceWarnPower: checks.leakage.slice_warn_power,
        reviewedColumns: Object.freeze([...checks.leakage.reviewed_columns]),
      },
      rankShift: {
        action: checks.rank_shift.action,
        falseDiscoveryRate: checks.rank_shift.false_discovery_rate,
        minPositions: checks.rank_shift.min_positions,
        agreementPercentile: checks.rank_shift.agreement_percentile,
      },
      score: { action: checks.score.action, tolerance: checks.score.tolerance, alpha: checks.score.alpha },
      holdoutRows: { action: checks.holdout_rows.action },
      sensitivity: {
        action: checks.sensitivity.action,
        falseDiscoveryRate: checks.sensitivity.false_discovery_rate,
        minRelativeChange: checks.sensitivity.min_relative_change,
        unlabeledRatio: checks.sensitivity.unlabeled_ratio,
        minShare: checks.sensitivity.min_share,
      },
      gain: {
        action: checks.gain.action,
        topRanks: checks.gain.top_ranks,
        minGainShare: checks.gain.min_gain_share,
        minDistinct: checks.gain.min_distinct,
      },
      slices: { action: checks.slices.action, minRows: checks.slices.min_rows },
      correlatedGroups: { action: checks.correlated_groups.action },
    },
    slices: policy.slices.map((s) => ({ name: s.name, where: toSliceFilter(s.where) })),
    report: { maxTableRows: policy.report.max_table_rows },
  })
}

/**
 * The schema of a `plumbline.yml` document, as produced by YAML's failsafe schema (mappings,
 * lists and text; an empty value is null), resolving to a frozen `GateConfig`.
 * Use parsePolicy for files: it adds line:column and key paths to every problem.
 */
export const policySchema = documentSchema.superRefine(checkAcrossSections).transform(toGateConfig)
