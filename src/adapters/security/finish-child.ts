import type { ChildProcess } from 'node:child_process'

/** After the command exits, how long its pipes may stay open before they are closed from our side. */
export const PIPE_GRACE_MILLISECONDS = 1_000

/**
 * Resolves when `child` has exited and its pipes are drained, or PIPE_GRACE_MILLISECONDS after it
 * exited while something it started in another session (setsid) still holds a pipe open: the pipes
 * are then destroyed, so that a lingering grandchild cannot make plumbline wait for ever.
 */
export function waitForChild(child: ChildProcess): Promise<{ code: number | null; signal: NodeJS.Signals | null; startError?: Error }> {
  return new Promise((resolve) => {
    let graceTimer: NodeJS.Timeout | undefined
    let exited: { code: number | null; signal: NodeJS.Signals | null } | undefined
    let done = false
    const finish = (outcome: { code: number | null; signal: NodeJS.Signals | null; startError?: Error }) => {
      if (done) return
      done = true
      clearTimeout(graceTimer)
      resolve(outcome)
    }
    child.on('error', (error) => finish({ code: null, signal: null, startError: error }))
    child.on('exit', (code, signal) => {
      exited = { code, signal }
      graceTimer = setTimeout(() => {
        for (const stream of [child.stdout, child.stderr]) stream?.destroy()
        finish(exited!)
      }, PIPE_GRACE_MILLISECONDS)
      graceTimer.unref?.()
    })
    child.on('close', (code, signal) => finish(exited ?? { code, signal }))
  })
}

/** "exited with code 3" or "was killed by signal SIGKILL". */
export function describeExit(code: number | null, signal: NodeJS.Signals | null): string {
  if (code !== null) return `exited with code ${code}`
  return signal ? `was killed by signal ${signal}` : 'ended without an exit code'
}
