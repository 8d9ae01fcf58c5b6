/**
 * Runs the repository's own training command (`model.train.command`) once and returns the ONNX
 * model it wrote. The command runs under `/bin/sh -c` in the side's checkout, with its stderr
 * merged into stdout (so the log keeps the order the command printed in), in a process group of
 * its own so that a timeout or a stop ends everything it started (SIGTERM, then SIGKILL after 2 s;
 * whatever is still in the group when the command exits is killed too; a grandchild that left the
 * group with setsid and holds the output open is not waited for). It gets an allowlisted environment
 * (childEnvironment: no token, no INPUT_* or ACTIONS_*) plus the PLUMBLINE_ variables. The model is
 * read only from a regular file (not a symlink, FIFO or device) of at most readLimits.model bytes.
 */
import { spawn } from 'node:child_process'
import { rm, stat } from 'node:fs/promises'
import { performance } from 'node:perf_hooks'
import { UserError } from '../../core/errors.ts'
import { readLimits, readRegularFile } from '../files/confined-file.ts'
import { childEnvironment } from '../security/child-environment.ts'
import { describeExit, waitForChild } from '../security/finish-child.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'

/** The environment variables a training command is given (our names; documentation cites this list). */
export const TRAINING_VARIABLES = [
  { name: 'PLUMBLINE_SEED', meaning: 'the seed for this fit, a whole number from 0 to 4294967295 derived from the policy seed' },
  { name: 'PLUMBLINE_OUTPUT', meaning: 'the path the command must write its ONNX model to' },
  { name: 'PLUMBLINE_TRAIN', meaning: 'the path of the rows to train on' },
  { name: 'PLUMBLINE_HOLDOUT', meaning: 'the path of the holdout rows (for early stopping at most; the gate scores on them)' },
  { name: 'PLUMBLINE_LEAVE_OUT', meaning: 'columns to leave out of this fit, separated by commas (drop-column importance); empty for an ordinary refit' },
  { name: 'PLUMBLINE_SIDE', meaning: "'base' or 'head'" },
  { name: 'PLUMBLINE_REFIT', meaning: 'the refit number within the side, from 0' },
] as const

export type TrainingVariable = (typeof TRAINING_VARIABLES)[number]['name']

/** Lines of output kept for messages. */
export const LOG_TAIL_LINES = 60
/** Characters of output kept while the command runs (bounds memory whatever the command prints). */
const LOG_TAIL_CHARACTERS = 16_384
/** After SIGTERM, how long the process group gets before SIGKILL. */
const KILL_GRACE_MILLISECONDS = 2_000

export interface TrainingCommandRequest {
  readonly command: string
  /** The directory the command runs in (the side's checkout). */
  readonly cwd: string
  readonly timeoutSeconds: number
  /** Variables added to the inherited environment (the PLUMBLINE_ ones). PLUMBLINE_OUTPUT is set from outputPath. */
  readonly env: Record<string, string>
  /** Where the command must write the model; removed first if it exists. */
  readonly outputPath: string
  /** Which fit this is, for messages, e.g. "base refit 2". */
  readonly label: string
  /** Aborting stops the command (the whole process group); the reason goes into the message. */
  readonly signal?: AbortSignal
}

export interface TrainingCommandResult {
  readonly bytes: Uint8Array
  readonly seconds: number
  /** The last LOG_TAIL_LINES lines the command printed (stdout and stderr together). */
  readonly logTail: string
}

export async function runTrainingCommand(request: TrainingCommandRequest): Promise<TrainingCommandResult> {
  if (!(request.timeoutSeconds > 0)) {
    throw new RangeError(`runTrainingCommand needs timeoutSeconds > 0, got ${request.timeoutSeconds}`)
  }
  const isDirectory = await stat(request.cwd).then((s) => s.isDirectory(), () => false)
  if (!isDirectory) {
    throw new UserError(
      `The training command for ${request.label} cannot run: its directory ${request.cwd} does not exist.`,
      `Check that the side's checkout is where plumbline looks for it.`,
    )
  }
  await rm(request.outputPath, { force: true })
  const env = { ...request.env, PLUMBLINE_OUTPUT: request.outputPath }
  const started = performance.now()
  const outcome = await runInProcessGroup(request, env)
  const seconds = (performance.now() - started) / 1000
  const logTail = cleanOutsideText(outcome.log.text())

  const failure = (what: string, fix: string) =>
    new UserError(
      `The training command for ${request.label} ${what}.\nCommand: ${cleanOutsideText(request.command)}\n${describeLog(logTail)}`,
      fix,
    )
  const reproduce = `To reproduce it, run the command in ${request.cwd} with ${Object.entries(env)
    .map(([name, value]) => `${name}=${shellQuote(value)}`)
    .join(' ')}`

  if (outcome.startError) {
    throw new UserError(
      `The training command for ${request.label} could not be started in ${request.cwd}: ${outcome.startError.message}`,
      `Check that /bin/sh exists and that the directory can be entered.`,
    )
  }
  if (outcome.stoppedBecause !== undefined) {
    throw failure(`was stopped because ${outcome.stoppedBecause}`, 'Fix the failure named here; this fit was stopped only because of it.')
  }
  if (outcome.timedOut) {
    throw failure(
      `timed out after ${request.timeoutSeconds} s`,
      `Make the command faster, or raise 'model.train.timeout_seconds' (now ${request.timeoutSeconds}) in plumbline.yml.`,
    )
  }
  if (outcome.code !== 0) {
    throw failure(describeExit(outcome.code, outcome.signal), reproduce)
  }
  const noModel = () =>
    failure(
      'finished but wrote no model to $PLUMBLINE_OUTPUT',
      `Make the command write its ONNX model to the path it is given in $PLUMBLINE_OUTPUT (this time ${request.outputPath}).`,
    )
  const bytes = new Uint8Array(
    await readRegularFile(request.outputPath, {
      maxBytes: readLimits.model,
      what: 'ONNX model',
      name: `The model the training command for ${request.label} wrote to $PLUMBLINE_OUTPUT`,
      missing: noModel,
      noFollow: true,
      limitFix: 'Write a smaller model (fewer or shallower trees), or check what the command writes to $PLUMBLINE_OUTPUT.',
    }),
  )
  if (bytes.length === 0) throw noModel()
  return { bytes, seconds, logTail }
}

interface Outcome {
  readonly log: LogTail
  readonly code: number | null
  readonly signal: NodeJS.Signals | null
  readonly timedOut: boolean
  readonly stoppedBecause?: string
  readonly startError?: Error
}

function runInProcessGroup(request: TrainingCommandRequest, env: Record<string, string>): Promise<Outcome> {
  const log = new LogTail()
  return new Promise((resolve) => {
    // The outer shell merges stderr into stdout, then becomes the user's command (exec keeps the pid,
    // so the group leader is the command itself). detached: a new process group led by that pid.
    const child = spawn('/bin/sh', ['-c', 'exec 2>&1; exec /bin/sh -c "$1"', 'plumbline-train', request.command], {
      cwd: request.cwd,
      env: childEnvironment(env),
      stdio: ['ignore', 'pipe', 'ignore'],
      detached: true,
    })
    let timedOut = false
    let stoppedBecause: string | undefined
    let killTimer: NodeJS.Timeout | undefined
    const signalGroup = (signal: NodeJS.Signals) => {
      try {
        if (child.pid !== undefined) process.kill(-child.pid, signal)
      } catch {
        // ESRCH: the group is already gone.
      }
    }
    const stop = () => {
      signalGroup('SIGTERM')
      killTimer ??= setTimeout(() => signalGroup('SIGKILL'), KILL_GRACE_MILLISECONDS)
    }
    const timeout = setTimeout(() => {
      timedOut = true
      stop()
    }, request.timeoutSeconds * 1000)
    const onAbort = () => {
      stoppedBecause = String(request.signal?.reason ?? 'the run was stopped')
      stop()
    }
    if (request.signal?.aborted) onAbort()
    else request.signal?.addEventListener('abort', onAbort, { once: true })

    child.stdout.setEncoding('utf8')
    child.stdout.on('data', (chunk: string) => log.add(chunk))
    // The command has exited; anything it left running in its group would hold the pipe open.
    child.on('exit', () => signalGroup('SIGKILL'))
    void waitForChild(child).then((outcome) => {
      clearTimeout(timeout)
      clearTimeout(killTimer)
      request.signal?.removeEventListener('abort', onAbort)
      resolve({ log, timedOut, stoppedBecause, ...outcome })
    })
  })
}

/** The end of a stream of text, bounded in characters while it grows and cut to whole lines at the end. */
class LogTail {
  private kept = ''

  add(chunk: string): void {
    this.kept += chunk
    if (this.kept.length > 2 * LOG_TAIL_CHARACTERS) this.kept = this.kept.slice(-LOG_TAIL_CHARACTERS)
  }

  text(): string {
    const lines = this.kept.slice(-LOG_TAIL_CHARACTERS).replace(/\r\n/g, '\n').split('\n')
    if (lines[lines.length - 1] === '') lines.pop()
    return lines.slice(-LOG_TAIL_LINES).join('\n')
  }
}

function describeLog(logTail: string): string {
  if (logTail === '') return 'It printed nothing.'
  const count = logTail.split('\n').length
  return `${count === 1 ? 'The last line' : `The last ${count} lines`} of its output:\n${logTail}`
}

function shellQuote(value: string): string {
  return /^[\w@%+=:,./-]+$/.test(value) ? value : `'${value.replace(/'/g, `'\\''`)}'`
}
