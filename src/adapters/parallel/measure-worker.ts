/**
 * Worker thread body: measures one side with the built-in learner (see measure-in-worker.ts).
 * Receives the side's data and settings, posts progress and then the measurement.
 */
import { parentPort, workerData } from 'node:worker_threads'
import { measureSide, type MeasureSideInputs, type MeasureSideOptions } from '../../core/measure-side.ts'
import { createBuiltinFit, type BuiltinLearnerSettings } from '../../core/models/builtin-fit.ts'
import type { Task } from '../../core/data/dataset.ts'
import type { MetricName } from '../../core/metrics/metric.ts'
import { metricByName } from '../../core/metrics/metric-by-name.ts'

interface Job {
  readonly inputs: Omit<MeasureSideInputs, 'fit' | 'model'>
  readonly options: Omit<MeasureSideOptions, 'onRefit' | 'metric'> & { readonly metricName: MetricName }
  readonly builtin: { readonly task: Task; readonly settings: BuiltinLearnerSettings }
}

const job = workerData as Job
try {
  const fit = createBuiltinFit(job.inputs.train, job.builtin.task, job.builtin.settings)
  const result = await measureSide(
    { ...job.inputs, fit },
    {
      ...job.options,
      metric: metricByName(job.options.metricName, job.builtin.task),
      onRefit: (refit, of) => parentPort!.postMessage({ type: 'progress', refit, of }),
    },
  )
  parentPort!.postMessage({ type: 'done', result })
} catch (error) {
  parentPort!.postMessage({ type: 'failed', message: error instanceof Error ? (error.stack ?? error.message) : String(error) })
}
