/**
 * Measures both sides with a pool of worker threads (tinypool) sized to the cores: every refit of
 * both sides with the built-in learner is one job (fit, score, permutation importance), so with R
 * refits a side 2R jobs share the pool instead of one thread a side. Each side's tables, its capped
 * evaluation and reference rows, and its bin matrix (binned once, in the main thread) live in
 * SharedArrayBuffers, so a job carries references, not copies. Results are combined in refit
 * order by combineRefits: the same pure code on the same data and seeds as measureSide in one
 * thread, so the numbers are identical (test/adapters/parallel/create-pool-measure.test.ts).
 *
 * Sides without the built-in learner (a loaded ONNX model, a training command) are measured in
 * this thread with measureSide, as before. `threads` (default: PLUMBLINE_THREADS, else
 * availableParallelism()) below 2 returns undefined: measure in turn, in process.
 *
 * What runGate passes: this MeasureSides as GateInputs.measureSides (the seam run-check.ts already
 * uses for the two-thread path); jobs need `builtin` set, as runGate does for built-in fits.
 */
import { availableParallelism } from 'node:os'
import Tinypool from 'tinypool'
import type { Dataset, FeatureMatrix } from '../../core/data/dataset.ts'
import { InternalError } from '../../core/errors.ts'
import { measureDropColumns } from '../../core/measure-drop-columns.ts'
import { combineRefits, measureSide, rankedFeatureNames, sideRefitSeeds, sideRows, type RefitMeasurement, type SideMeasurement, type SideRows } from '../../core/measure-side.ts'
import { binFeatures } from '../../core/models/gbt/bin-features.ts'
import type { MeasureJob, MeasureSides } from '../../core/run-gate.ts'
import type { RefitTask } from './refit-worker.ts'

export interface PoolMeasure {
  readonly measureSides: MeasureSides
  /** Ends the pool's threads; call once the gate is done. */
  close(): Promise<void>
}

export function createPoolMeasure(environment: Readonly<Record<string, string | undefined>>, options: { readonly threads?: number } = {}): PoolMeasure | undefined {
  const threads = options.threads ?? (environment.PLUMBLINE_THREADS === undefined ? availableParallelism() : Number(environment.PLUMBLINE_THREADS))
  if (!(threads >= 2)) return undefined
  const isSource = import.meta.url.endsWith('.ts')
  // From the TypeScript sources (tests, npm run demo) each worker registers tsx first
  // (refit-worker-source.mjs); the bundle's worker is plain JavaScript beside it (scripts/build.mjs
  // builds refit-worker.js).
  const pool = new Tinypool({
    filename: new URL(isSource ? './refit-worker-source.mjs' : './refit-worker.js', import.meta.url).href,
    minThreads: 0,
    maxThreads: Math.floor(threads),
  })
  const measureSides: MeasureSides = async (jobs) => {
    const results = await Promise.all(jobs.map((job) => (job.builtin ? inPool(pool, job) : measureSide({ ...job.inputs }, job.options))))
    return results as unknown as readonly [SideMeasurement, SideMeasurement]
  }
  return { measureSides, close: () => pool.destroy() }
}

async function inPool(pool: Tinypool, job: MeasureJob): Promise<SideMeasurement> {
  const builtin = job.builtin!
  const { onRefit, metric, ...options } = job.options
  const train = shareDataset(job.inputs.train)
  const holdout = shareDataset(job.inputs.holdout)
  const capped = sideRows({ holdout, reference: shareMatrix(job.inputs.reference), unlabeled: job.inputs.unlabeled }, options)
  const rows: SideRows = {
    evaluation: shareDataset(capped.evaluation) as SideRows['evaluation'],
    reference: shareMatrix(capped.reference),
    ...(capped.unlabeled ? { unlabeled: shareMatrix(capped.unlabeled) } : {}),
    slices: capped.slices.map((slice) => ({ ...slice, data: shareDataset(slice.data) as SideRows['evaluation'] })),
  }
  const binned = builtin.settings.learner === 'gradient-boosting' ? binFeatures(train, { maxBins: builtin.settings.maxBins, shared: true }) : undefined
  const seeds = sideRefitSeeds(job.inputs, options)
  const parts = await Promise.all(
    seeds.map((seed, refit) => {
      const task: RefitTask = { side: job.inputs.side, refit, seed, train, holdout, rows, binned, options: { ...options, metricName: metric.name }, builtin }
      onRefit?.(refit, seeds.length)
      return pool.run(task).catch((error: unknown) => {
        throw new InternalError(`refit ${refit + 1} of the ${job.inputs.side} side failed in a worker thread:\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}`)
      })
    }),
  )
  const combined = combineRefits(seeds, rows, parts as RefitMeasurement[])
  // Drop-column refits, each (feature, refit) pair one job, once the full importances rank the candidates.
  const request = options.dropColumns
  const dropColumns =
    request && seeds.length >= 2
      ? await measureDropColumns(
          {
            side: job.inputs.side,
            train,
            holdout,
            fit: job.inputs.fit!,
            scoreWithout: (name, refit) => {
              const task: RefitTask = { side: job.inputs.side, refit, seed: seeds[refit], train, holdout, rows, binned, options: { ...options, metricName: metric.name }, builtin, leaveOut: [name] }
              return (pool.run(task) as Promise<number>).catch((error: unknown) => {
                throw new InternalError(`a drop-column refit (without ${name}, refit ${refit + 1}) of the ${job.inputs.side} side failed in a worker thread:\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}`)
              })
            },
          },
          { request, ranked: rankedFeatureNames(combined), refitSeeds: seeds, metric },
        )
      : []
  return { ...combined, dropColumns }
}

/** The matrix with every column copied once into shared memory (workers read it without a copy). */
function shareMatrix<T extends FeatureMatrix>(matrix: T): T {
  return { ...matrix, columns: matrix.columns.map(shared) }
}

function shareDataset(data: Dataset): Dataset {
  const out = shareMatrix(data)
  return data.target ? { ...out, target: { ...data.target, values: shared(data.target.values) } } : out
}

function shared(values: Float64Array): Float64Array {
  if (values.buffer instanceof SharedArrayBuffer) return values
  const out = new Float64Array(new SharedArrayBuffer(values.byteLength))
  out.set(values)
  return out
}
