import { spawn } from 'node:child_process'
import { UserError } from '../../core/errors.ts'
import { childEnvironment } from '../security/child-environment.ts'
import { describeExit, waitForChild } from '../security/finish-child.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'

const TAIL_LINES = 40

/**
 * Runs the policy's `prepare` command with /bin/sh in one side's checkout, so that the side's own
 * feature code builds its feature tables. It gets an allowlisted environment (childEnvironment:
 * no token, no INPUT_* or ACTIONS_*), plus PLUMBLINE_SIDE. Output is kept (the last lines) and shown
 * on failure, with escape sequences removed and secrets redacted; the whole process group is killed
 * on timeout, and a grandchild that left the group and holds the output open is not waited for.
 */
export async function runPrepare(options: { command: string; cwd: string; timeoutSeconds: number; side: 'base' | 'head' }): Promise<void> {
  const { command, cwd, timeoutSeconds, side } = options
  const child = spawn('/bin/sh', ['-c', command], {
    cwd,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: childEnvironment({ PLUMBLINE_SIDE: side }),
  })
  let output = ''
  const keep = (chunk: Buffer) => {
    output = (output + chunk.toString('utf8')).slice(-64 * 1024)
  }
  child.stdout.on('data', keep)
  child.stderr.on('data', keep)
  const killGroup = () => {
    try {
      process.kill(-child.pid!, 'SIGKILL')
    } catch {
      // already gone
    }
  }
  let timedOut = false
  const timer = setTimeout(() => {
    timedOut = true
    killGroup()
  }, timeoutSeconds * 1000)
  // Whatever the command left running in its group would hold the pipes open.
  child.on('exit', killGroup)
  const { code, signal, startError } = await waitForChild(child).finally(() => clearTimeout(timer))
  if (startError) throw new UserError(`prepare on the ${side} side could not be started in ${cwd}: ${startError.message}`, 'Check that /bin/sh exists and that the checkout can be entered.')
  if (code === 0 && !timedOut) return
  const tail = cleanOutsideText(output.split('\n').slice(-TAIL_LINES).join('\n').trimEnd())
  const why = timedOut ? `timed out after ${timeoutSeconds} s` : describeExit(code, signal)
  throw new UserError(
    `prepare on the ${side} side ${why}: ${cleanOutsideText(command)}\n--- last lines of its output ---\n${tail || '(no output)'}`,
    timedOut
      ? "Make the command faster or raise 'prepare.timeout_seconds' in the policy."
      : `Run the command yourself in the ${side} checkout to see the problem.`,
  )
}
