/**
 * Every default of the policy, declared once (docs/policy.md and the README cite these by value).
 */
import type { ChecksConfig, BuiltinSettings, ReportConfig } from '../config.ts'
import type { Task } from '../data/dataset.ts'
import type { MetricName } from '../metrics/metric.ts'
// ---------------------------------------------------------------------------------------------

export function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object') {
    for (const inner of Object.values(value)) deepFreeze(inner)
    Object.freeze(value)
  }
  return value
}

export const defaultTopLevel = deepFreeze({ seed: 1 })

/**
 * Row caps: 100,000 training and 50,000 holdout rows. A refit of the default learner on 100,000 ×
 * 30 rows takes seconds, and the holdout's standard error of a mean-over-rows metric at 50,000 rows
 * is already below 0.5% of the metric's per-row SD (1/sqrt(50,000)), so more rows would buy time,
 * not resolution (common practice, not a published bound). Both lie far above the demo's and the
 * tests' tables, which are therefore never sampled.
 */
export const defaultData = deepFreeze({
  reference: { kind: 'train' } as const,
  split: { fraction: 0.2 },
  maxTrainRows: 100_000,
  maxHoldoutRows: 50_000,
})

export const defaultPrepare = deepFreeze({ timeoutSeconds: 600 })

/**
 * The built-in learner's defaults, the one set every fit uses (common practice, not tuned for any
 * data set): 200 rounds of depth-4 trees at learning rate 0.1, at least 20 rows per leaf (LightGBM's
 * min_data_in_leaf default), lambda 1 (XGBoost's default), and 0.8 of the rows and features per tree
 * so that reseeded refits differ, which the noise floor needs; 255 bins (XGBoost hist's default).
 */
export const defaultBoosting: BuiltinSettings = deepFreeze({
  trees: 200,
  maxDepth: 4,
  learningRate: 0.1,
  minRowsPerLeaf: 20,
  l2: 1,
  rowSubsample: 0.8,
  columnSubsample: 0.8,
  maxBins: 255,
})

export const defaultTrainCommand = deepFreeze({ timeoutSeconds: 1800, parallel: 2 })

/** The binary or regression task each metric belongs to; `importance.metric` must match `task` (see metricsOfTask). */
export const metricTasks: Readonly<Record<MetricName, Task>> = deepFreeze({
  auc: 'binary',
  'log-loss': 'binary',
  accuracy: 'binary',
  brier: 'binary',
  rmse: 'regression',
  mae: 'regression',
  r2: 'regression',
})

/** The metrics of a multiclass task: log-loss, accuracy (of the most probable class), macro one-vs-rest AUC. */
export const multiclassMetrics: readonly MetricName[] = deepFreeze(['log-loss', 'accuracy', 'auc'])

/** The metrics `importance.metric` may name for `task`. */
export function metricsOfTask(task: Task): MetricName[] {
  if (task === 'multiclass') return [...multiclassMetrics]
  return (Object.keys(metricTasks) as MetricName[]).filter((name) => metricTasks[name] === task)
}

/** `importance.metric` when the policy names none. */
export const defaultMetric: Readonly<Record<Task, MetricName>> = deepFreeze({
  binary: 'log-loss',
  regression: 'rmse',
  multiclass: 'log-loss',
})

export const defaultImportance = deepFreeze({
  draws: 5,
  refits: 5,
  referenceRows: 10_000,
  evaluationRows: 20_000,
  groupThreshold: 0.9,
  dropColumnTop: 1,
})

export const defaultChecks: ChecksConfig = deepFreeze({
  leakage: {
    action: 'block',
    dominanceShare: 0.5,
    runnerUpRatio: 3,
    singleFeaturePower: 0.99,
    relativePower: 0.8,
    liftWarn: 0.15,
    liftBlock: 0.25,
    sliceWarnPower: 0.9,
    reviewedColumns: [],
  },
  rankShift: {
    action: 'warn',
    falseDiscoveryRate: 0.05,
    minPositions: 2,
    agreementPercentile: 5,
  },
  score: { action: 'block', tolerance: 0, alpha: 0.05 },
  holdoutRows: { action: 'block' },
  sensitivity: { action: 'warn', falseDiscoveryRate: 0.05, minRelativeChange: 0.2, unlabeledRatio: 2, minShare: 0.05 },
  gain: { action: 'warn', topRanks: 3, minGainShare: 0.1, minDistinct: 10 },
  slices: { action: 'warn', minRows: 200 },
  correlatedGroups: { action: 'info' },
})

export const defaultReport: ReportConfig = deepFreeze({ maxTableRows: 50 })

/** Largest value of an unsigned 32-bit integer: the seed's range is 0..uint32Max. */
export const uint32Max = 2 ** 32 - 1

