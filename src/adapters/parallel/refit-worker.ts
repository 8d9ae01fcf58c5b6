/**
 * Worker body of the refit pool (create-pool-measure.ts): one refit of one side with the built-in
 * learner, from data in shared memory. Fits on the side's shared bin matrix (no re-binning) and
 * returns measureRefit's part, the same pure code on the same data and seeds as in the main thread.
 */
import { selectFeatures, type Dataset, type Task } from '../../core/data/dataset.ts'
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
  /** A drop-column refit: fit without these features and return only the holdout score. */
  readonly leaveOut?: readonly string[]
}

export default async function runRefit(task: RefitTask): Promise<RefitMeasurement | number> {
  const fit = createBuiltinFit(task.train, task.builtin.task, task.builtin.settings, { binned: task.binned })
  const model = await fit({ side: task.side, seed: task.seed, refit: task.refit, leaveOut: task.leaveOut ?? [] })
  const options: MeasureSideOptions = { ...task.options, metric: metricByName(task.options.metricName, task.builtin.task) }
  if (task.leaveOut) {
    // As measureDropColumns scores a drop-column refit in the main thread.
    const prediction = await model.predict(selectFeatures(task.holdout, model.featureNames))
    return options.metric.compute(task.holdout.target!.values, prediction)
  }
  return measureRefit(model, { holdout: task.holdout, train: task.train }, options, task.rows, task.refit)
}
