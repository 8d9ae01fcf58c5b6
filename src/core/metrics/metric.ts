import type { Task } from '../data/dataset.ts'

/** A holdout score. `higherIsBetter` fixes the sign of importance: importance is always "how much worse". */
export interface Metric {
  readonly name: MetricName
  readonly task: Task
  readonly higherIsBetter: boolean
  /** y: targets (0/1 for binary); prediction: value or positive-class probability. */
  compute(y: ArrayLike<number>, prediction: ArrayLike<number>): number
}

export type MetricName = 'auc' | 'log-loss' | 'accuracy' | 'brier' | 'rmse' | 'mae' | 'r2'
