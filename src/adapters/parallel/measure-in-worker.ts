import { availableParallelism } from 'node:os'
import { Worker } from 'node:worker_threads'
import { InternalError } from '../../core/errors.ts'
import { measureSide, type SideMeasurement } from '../../core/measure-side.ts'
import type { MeasureSides } from '../../core/gate/gate-inputs.ts'

/**
 * Measures the two sides at once, each in its own worker thread, when the machine has at least two
 * cores and both sides use a built-in learner (whose fit can be rebuilt from plain data inside the
 * worker). Each side's numbers are those of the in-process measurement: the same pure code on the
 * same data and seeds. Otherwise, or with `PLUMBLINE_THREADS=1`, the sides are measured in process.
 */
export function createParallelMeasure(environment: Readonly<Record<string, string | undefined>>): MeasureSides | undefined {
  const threads = environment.PLUMBLINE_THREADS === undefined ? availableParallelism() : Number(environment.PLUMBLINE_THREADS)
  if (!(threads >= 2)) return undefined
  return async (jobs) =>
    Promise.all(
      jobs.map((job) =>
        job.builtin ? inWorker(job) : measureSide({ ...job.inputs }, job.options),
      ),
    ) as Promise<[SideMeasurement, SideMeasurement]>
}

function inWorker(job: Parameters<MeasureSides>[0][number]): Promise<SideMeasurement> {
  const isSource = import.meta.url.endsWith('.ts')
  const script = new URL(isSource ? './measure-worker.ts' : './measure-worker.js', import.meta.url)
  const { fit: _fit, model: _model, ...inputs } = job.inputs
  const { onRefit, metric, ...options } = job.options
  const workerData = { inputs, options: { ...options, metricName: metric.name }, builtin: job.builtin }
  // From the TypeScript sources (tests, npm run demo) the worker registers tsx first; the bundle's
  // worker is plain JavaScript beside it.
  const worker = isSource
    ? new Worker(
        `import(${JSON.stringify(import.meta.resolve('tsx/esm/api'))}).then((tsx) => { tsx.register(); return import(${JSON.stringify(script.href)}) })`,
        { eval: true, workerData },
      )
    : new Worker(script, { workerData })
  return new Promise<SideMeasurement>((resolve, reject) => {
    let settled = false
    worker.on('message', (message: { type: string; refit?: number; of?: number; result?: SideMeasurement; message?: string }) => {
      if (message.type === 'progress') onRefit?.(message.refit!, message.of!)
      else if (message.type === 'done') {
        settled = true
        resolve(message.result!)
      } else if (message.type === 'failed') {
        settled = true
        reject(new InternalError(`measuring the ${job.inputs.side} side failed in its worker thread:\n${message.message}`))
      }
    })
    worker.on('error', (error) => {
      settled = true
      reject(error)
    })
    worker.on('exit', (code) => {
      if (!settled) reject(new InternalError(`the worker thread measuring the ${job.inputs.side} side exited with code ${code}`))
    })
  }).finally(() => worker.terminate())
}
