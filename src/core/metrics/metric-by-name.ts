import type { Task } from '../data/dataset.ts'
import { UserError } from '../errors.ts'
import { accuracy } from './accuracy.ts'
import { brierScore } from './brier-score.ts'
import { logLoss } from './log-loss.ts'
import { macroOvrAuc } from './macro-ovr-auc.ts'
import { mae } from './mae.ts'
import type { Metric, MetricName } from './metric.ts'
import { multiclassAccuracy } from './multiclass-accuracy.ts'
import { multiclassLogLoss } from './multiclass-log-loss.ts'
import { rmse } from './rmse.ts'
import { rocAuc } from './roc-auc.ts'
import { rSquared } from './r-squared.ts'

const METRICS: readonly Metric[] = [
  { name: 'auc', task: 'binary', higherIsBetter: true, compute: rocAuc },
  { name: 'log-loss', task: 'binary', higherIsBetter: false, compute: logLoss },
  { name: 'accuracy', task: 'binary', higherIsBetter: true, compute: (y, p) => accuracy(y, p) },
  { name: 'brier', task: 'binary', higherIsBetter: false, compute: brierScore },
  { name: 'rmse', task: 'regression', higherIsBetter: false, compute: rmse },
  { name: 'mae', task: 'regression', higherIsBetter: false, compute: mae },
  { name: 'r2', task: 'regression', higherIsBetter: true, compute: rSquared },
  // Multiclass: predictions are row-major [N, K] class probabilities, y the class index.
  { name: 'log-loss', task: 'multiclass', higherIsBetter: false, compute: multiclassLogLoss },
  { name: 'accuracy', task: 'multiclass', higherIsBetter: true, compute: multiclassAccuracy },
  { name: 'auc', task: 'multiclass', higherIsBetter: true, compute: macroOvrAuc },
]

const TASK_WORDS: Record<Task, string> = { binary: 'a binary target', regression: 'a regression target', multiclass: 'a multiclass target' }

/**
 * The metric called `name` for `task`, with `higherIsBetter` set. `name` may come straight from a
 * user's configuration: a name that does not exist, or a metric that does not fit the task, is a
 * UserError listing the metrics allowed for the task. Binary accuracy uses the threshold 0.5;
 * multiclass accuracy the most probable class, and multiclass 'auc' is the macro one-vs-rest AUC.
 */
export function metricByName(name: MetricName, task: Task): Metric {
  const allowed = METRICS.filter((m) => m.task === task)
  const metric = allowed.find((m) => m.name === name)
  if (metric) return metric
  const exists = METRICS.some((m) => m.name === name)
  throw new UserError(
    `${exists ? `The metric '${name}' does not fit` : `There is no metric '${name}' for`} ${TASK_WORDS[task]}; the metrics for ${TASK_WORDS[task]} are ${allowed.map((m) => m.name).join(', ')}.`,
    `Choose one of those, or leave the metric out to use ${defaultMetric(task)}.`,
  )
}

/**
 * The metric used when none is configured: 'log-loss' for binary and multiclass, 'rmse' for regression.
 *
 * Log loss rather than AUC for binary: it is a strictly proper scoring rule (Gneiting & Raftery 2007,
 * JASA 102(477)), so it rewards calibrated probabilities and not only their order, and it moves with
 * every change in a probability. AUC moves only when a permutation swaps the order of a positive and
 * a negative, so permutation importance on AUC is coarse and often exactly 0 for features that shift
 * probabilities without reordering them (common practice). RMSE for regression: it is the square root
 * of the squared error most learners fit, in the target's unit, so importances read as "how many
 * units worse".
 */
export function defaultMetric(task: Task): MetricName {
  return task === 'regression' ? 'rmse' : 'log-loss'
}
