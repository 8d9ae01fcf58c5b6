import { spawn } from 'node:child_process'
import { UserError } from '../../core/errors.ts'

const TAIL_LINES = 40

/**
 * Runs the policy's `prepare` command with /bin/sh in one side's checkout, so that the side's own
 * feature code builds its feature tables. Output is kept (the last lines) and shown on failure; the
 * whole process group is killed on timeout.
 */
export async function runPrepare(options: { command: string; cwd: string; timeoutSeconds: number; side: 'base' | 'head' }): Promise<void> {
  const { command, cwd, timeoutSeconds, side } = options
  const child = spawn('/bin/sh', ['-c', command], {
    cwd,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, PLUMBLINE_SIDE: side },
  })
  let output = ''
  const keep = (chunk: Buffer) => {
    output = (output + chunk.toString('utf8')).slice(-64 * 1024)
  }
  child.stdout.on('data', keep)
  child.stderr.on('data', keep)
  let timedOut = false
  const timer = setTimeout(() => {
    timedOut = true
    try {
      process.kill(-child.pid!, 'SIGKILL')
    } catch {
      // already gone
    }
  }, timeoutSeconds * 1000)
  const code = await new Promise<number | null>((done, fail) => {
    child.on('error', fail)
    child.on('close', (exitCode) => done(exitCode))
  }).finally(() => clearTimeout(timer))
  if (code === 0 && !timedOut) return
  const tail = output.split('\n').slice(-TAIL_LINES).join('\n').trimEnd()
  const why = timedOut ? `timed out after ${timeoutSeconds} s` : `exited with code ${code}`
  throw new UserError(
    `prepare on the ${side} side ${why}: ${command}\n--- last lines of its output ---\n${tail || '(no output)'}`,
    timedOut
      ? "Make the command faster or raise 'prepare.timeout_seconds' in the policy."
      : `Run the command yourself in the ${side} checkout to see the problem.`,
  )
}
