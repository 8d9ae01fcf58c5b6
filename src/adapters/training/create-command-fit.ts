/**
 * A Fit that trains with the repository's own command (`model.train`): one run of the command per
 * FitRequest, each into a temporary directory of its own that is removed afterwards, the ONNX model
 * it writes loaded with loadOnnxModel. At most `parallel` commands run at once, across both sides.
 *
 * A failed fit fails the whole run, never leaving a partial result: the first failure (of the
 * command, or of loading what it wrote) stops the commands still running, and every fit not yet
 * started rejects without running. The first failure keeps its own message; the others say they
 * were stopped because of it.
 *
 * Each refit model must name its columns itself (metadata `plumbline.features` or one input per
 * column), since a refit that leaves columns out has fewer of them; it is loaded against the data's
 * features without the left-out ones, so a refit that ignored PLUMBLINE_LEAVE_OUT is refused.
 */
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { FeatureInfo, Task } from '../../core/data/dataset.ts'
import { UserError } from '../../core/errors.ts'
import type { Fit, FitRequest, Model } from '../../core/models/model.ts'
import { loadOnnxModel } from '../onnx/load-onnx-model.ts'
import { createSemaphore } from './create-semaphore.ts'
import { runTrainingCommand, type TrainingVariable } from './run-training-command.ts'

export interface CommandSide {
  /** The side's checkout: the command runs here. */
  readonly cwd: string
  /** PLUMBLINE_TRAIN and PLUMBLINE_HOLDOUT. */
  readonly train: string
  readonly holdout: string
}

export interface CommandFitOptions {
  readonly command: string
  readonly timeoutSeconds: number
  /** Commands running at once, 1..64 (`model.train.parallel`). */
  readonly parallel: number
  readonly sides: Partial<Record<FitRequest['side'], CommandSide>>
  readonly task: Task
  /** The data's feature columns. */
  readonly features: readonly FeatureInfo[]
  readonly positiveClass?: string | number
  /**
   * Multiclass: the data's classes in order. The model the command writes must output [N, K] class
   * probabilities, its columns labelled by the classifier's class labels or, without labels, in this order.
   */
  readonly classes?: readonly string[]
  readonly batchRows?: number
  /** Where the per-fit temporary directories go; default the system's temporary directory. */
  readonly temporaryRoot?: string
  /** Called after each successful command, e.g. to log how long it took. */
  readonly onTrained?: (event: { readonly label: string; readonly seconds: number; readonly logTail: string }) => void
}

/** "base refit 2", "head refit 0 without distance_km, stop_count". */
export function describeFit(request: FitRequest): string {
  const without = request.leaveOut.length > 0 ? ` without ${request.leaveOut.join(', ')}` : ''
  return `${request.side} refit ${request.refit}${without}`
}

/** The PLUMBLINE_ variables of one fit, except PLUMBLINE_OUTPUT (runTrainingCommand sets it). */
export function trainingEnvironment(request: FitRequest, side: CommandSide): Record<Exclude<TrainingVariable, 'PLUMBLINE_OUTPUT'>, string> {
  const withComma = request.leaveOut.find((name) => name.includes(','))
  if (withComma !== undefined) {
    throw new UserError(
      `Column '${withComma}' cannot be left out for the training command: PLUMBLINE_LEAVE_OUT separates columns with commas.`,
      `Rename the column so that it has no comma.`,
    )
  }
  return {
    PLUMBLINE_SEED: String(request.seed >>> 0),
    PLUMBLINE_TRAIN: side.train,
    PLUMBLINE_HOLDOUT: side.holdout,
    PLUMBLINE_LEAVE_OUT: request.leaveOut.join(','),
    PLUMBLINE_SIDE: request.side,
    PLUMBLINE_REFIT: String(request.refit),
  }
}

export function createCommandFit(options: CommandFitOptions): Fit {
  if (!Number.isInteger(options.parallel) || options.parallel < 1 || options.parallel > 64) {
    throw new RangeError(`createCommandFit needs parallel to be a whole number from 1 to 64, got ${options.parallel}`)
  }
  const limit = createSemaphore(options.parallel)
  const stop = new AbortController()
  let firstFailure: string | undefined

  // Marks the run failed and stops the rest. Called inside the semaphore for a command's failure,
  // so that the slot it frees cannot start a queued fit first.
  const fail = (label: string, error: unknown): never => {
    if (firstFailure === undefined) {
      firstFailure = `the training command for ${label} failed`
      stop.abort(firstFailure)
    }
    throw error
  }

  return async (request: FitRequest): Promise<Model> => {
    const side = options.sides[request.side]
    if (!side) throw new RangeError(`createCommandFit has no checkout for side '${request.side}'`)
    const label = describeFit(request)
    const bytes = await limit(async () => {
      if (firstFailure !== undefined) {
        throw new UserError(`The training command for ${label} was not run, because ${firstFailure}.`)
      }
      const directory = await mkdtemp(join(options.temporaryRoot ?? tmpdir(), 'plumbline-train-'))
      try {
        const result = await runTrainingCommand({
          command: options.command,
          cwd: side.cwd,
          timeoutSeconds: options.timeoutSeconds,
          env: trainingEnvironment(request, side),
          outputPath: join(directory, 'model.onnx'),
          label,
          signal: stop.signal,
        })
        options.onTrained?.({ label, seconds: result.seconds, logTail: result.logTail })
        return result.bytes
      } catch (error) {
        return fail(label, error)
      } finally {
        await rm(directory, { recursive: true, force: true })
      }
    })
    const leftOut = new Set(request.leaveOut)
    try {
      return await loadOnnxModel(bytes, {
        source: `$PLUMBLINE_OUTPUT of ${label}`,
        task: options.task,
        features: options.features.filter((f) => !leftOut.has(f.name)),
        positiveClass: options.positiveClass,
        ...(options.classes ? { classes: options.classes } : {}),
        batchRows: options.batchRows,
      })
    } catch (error) {
      return fail(label, error)
    }
  }
}
