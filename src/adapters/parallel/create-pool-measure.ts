/**
 * Measures both sides with a pool of worker threads (tinypool) sized to the cores: every work unit
 * (core/gate/work-units.ts) of a side with the built-in learner is one job (a refit: fit, score,
 * permutation importance; or a drop-column refit's score), so with R refits a side 2R jobs share
 * the pool instead of one thread a side. Each side's tables, its capped
 * evaluation and reference rows, and its bin matrix (binned once, in the main thread) live in
 * SharedArrayBuffers, so a job carries references, not copies. Results are combined by
 * measureByUnits: the same pure code on the same data and seeds as measureSide in one thread, so the numbers are identical (test/adapters/parallel/create-pool-measure.test.ts).
 *
 * Units of sides without the built-in learner (a loaded ONNX model, a training command) run in
 * this thread (executeInProcess). `threads` (default: PLUMBLINE_THREADS, else
 * availableParallelism()) below 2 returns undefined: measure in turn, in process.
 *
 * What runGate passes: this MeasureSides as GateInputs.measureSides (the seam run-check.ts already
 * uses for the two-thread path); jobs need `builtin` set, as runGate does for built-in fits.
 */
import { availableParallelism } from 'node:os'
import Tinypool from 'tinypool'
import type { Dataset, FeatureMatrix } from '../../core/data/dataset.ts'
import { InternalError } from '../../core/errors.ts'
import { executeInProcess, leftOut, measureSidesWith, type ExecuteUnits, type UnitResult, type WorkUnit } from '../../core/gate/work-units.ts'
import { sideRefitSeeds, type RefitMeasurement, type SideRows } from '../../core/measure-side.ts'
import { binFeatures, type BinnedFeatures } from '../../core/models/gbt/bin-features.ts'
import type { MeasureJob, MeasureSides } from '../../core/run-gate.ts'
import type { RefitTask } from './refit-worker.ts'

export interface PoolMeasure {
  readonly measureSides: MeasureSides
  /** The pool as a unit executor (work-units.ts), for callers that wrap it (the unit cache, shards). */
  readonly execute: ExecuteUnits
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
  const sharedSides = new WeakMap<MeasureJob, SharedSide>()
  const execute: ExecuteUnits = async (units, context) => {
    // Units of a side without the built-in learner (a loaded model, a training command) run here, in order.
    const here = units.filter((u) => !context.jobs[u.side === 'base' ? 0 : 1].builtin)
    const local = here.length > 0 ? executeInProcess(here, context) : Promise.resolve([])
    const pooled = units.map((unit) => {
      const j = unit.side === 'base' ? 0 : 1
      const job = context.jobs[j]
      if (!job.builtin) return undefined
      let side = sharedSides.get(job)
      if (!side) sharedSides.set(job, (side = shareSide(job, context.rows[j])))
      return inPool(pool, job, side, unit)
    })
    const localResults = await local
    const results = await Promise.all(pooled)
    let next = 0
    return results.map((r) => r ?? localResults[next++])
  }
  return { measureSides: measureSidesWith(execute), execute, close: () => pool.destroy() }
}

interface SharedSide {
  readonly train: Dataset
  readonly holdout: Dataset
  readonly rows: SideRows
  readonly binned?: BinnedFeatures
}

/** A side's tables, capped rows and bin matrix in shared memory, once per side. */
function shareSide(job: MeasureJob, capped: SideRows): SharedSide {
  const train = shareDataset(job.inputs.train)
  const rows: SideRows = {
    evaluation: shareDataset(capped.evaluation) as SideRows['evaluation'],
    reference: shareMatrix(capped.reference),
    ...(capped.unlabeled ? { unlabeled: shareMatrix(capped.unlabeled) } : {}),
    slices: capped.slices.map((slice) => ({ ...slice, data: shareDataset(slice.data) as SideRows['evaluation'] })),
  }
  const settings = job.builtin!.settings
  const binned = settings.learner === 'gradient-boosting' ? binFeatures(train, { maxBins: settings.maxBins, shared: true }) : undefined
  return { train, holdout: shareDataset(job.inputs.holdout), rows, ...(binned ? { binned } : {}) }
}

/** One unit of a built-in side as one job of the pool: a refit (fit, score, importance) or a drop-column refit's score (one feature or a group left out). */
async function inPool(pool: Tinypool, job: MeasureJob, side: SharedSide, unit: WorkUnit): Promise<UnitResult> {
  const { onRefit, metric, ...options } = job.options
  const base = { side: unit.side, refit: unit.refit, seed: unit.seed, train: side.train, holdout: side.holdout, rows: side.rows, binned: side.binned, options: { ...options, metricName: metric.name }, builtin: job.builtin! }
  if (unit.kind === 'refit') {
    onRefit?.(unit.refit, sideRefitSeeds(job.inputs, job.options).length)
    const task: RefitTask = base
    const part = await (pool.run(task) as Promise<RefitMeasurement>).catch((error: unknown) => {
      throw new InternalError(`refit ${unit.refit + 1} of the ${unit.side} side failed in a worker thread:\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}`)
    })
    return { kind: 'refit', part }
  }
  const task: RefitTask = { ...base, leaveOut: leftOut(unit) }
  const score = await (pool.run(task) as Promise<number>).catch((error: unknown) => {
    throw new InternalError(`a drop-column refit (without ${leftOut(unit).join(', ')}, refit ${unit.refit + 1}) of the ${unit.side} side failed in a worker thread:\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}`)
  })
  return { kind: 'drop-column', score }
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
