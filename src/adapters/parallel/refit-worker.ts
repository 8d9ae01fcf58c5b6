/**
 * Worker body of the refit pool (create-pool-measure.ts): one refit of one side with the built-in
 * learner, from data in shared memory. Fits on the side's shared bin matrix (no re-binning) and
 * returns measureRefit's part, the same pure code on the same data and seeds as in the main thread.
 */
import type { Dataset, Task } from '../../core/data/dataset.ts'
import { measureRefit, type MeasureSideOptions, type RefitMeasurement, type SideRows } from '../../core/measure-side.ts'
import { createBuiltinFit, type BuiltinLearnerSettings } from '../../core/models/builtin-fit.ts'
import type { BinnedFeatures } from '../../core/models/gbt/bin-features.ts'
import type { MetricName } from '../../core/metrics/metric.ts'
import { metricByName } from '../../core/metrics/metric-by-name.ts'

export interface RefitTask {
  readonly side: 'base' | 'head'
  readonly refit: number
  readonly seed: number
  readonly train: Dataset
  readonly holdout: Dataset
  readonly rows: SideRows
  readonly binned?: BinnedFeatures
  readonly options: Omit<MeasureSideOptions, 'onRefit' | 'metric'> & { readonly metricName: MetricName }
  readonly builtin: { readonly task: Task; readonly settings: BuiltinLearnerSettings }
}

export default async function runRefit(task: RefitTask): Promise<RefitMeasurement> {
  const fit = createBuiltinFit(task.train, task.builtin.task, task.builtin.settings, { binned: task.binned })
  const model = await fit({ side: task.side, seed: task.seed, refit: task.refit, leaveOut: [] })
  const options: MeasureSideOptions = { ...task.options, metric: metricByName(task.options.metricName, task.builtin.task) }
  return measureRefit(model, { holdout: task.holdout, train: task.train }, options, task.rows, task.refit)
}
