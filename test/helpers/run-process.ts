/**
 * The real CLI and the real action as processes, run from their TypeScript sources with tsx (the
 * same entry points the bundles are built from), so that tests of hostile input need no rebuilt
 * dist/. Each run has a wall-clock limit: a hang is a test failure, not a stuck suite.
 */
import { execFile } from 'node:child_process'
import { dirname, join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'

export const projectRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..')

const tsxLoader = pathToFileURL(join(projectRoot, 'node_modules', 'tsx', 'dist', 'loader.mjs')).href

export interface ProcessRun {
  readonly code: number
  readonly stdout: string
  readonly stderr: string
  readonly seconds: number
  /** Killed at the wall-clock limit. */
  readonly timedOut: boolean
}

export function runSource(entry: 'cli' | 'action', args: readonly string[], options: { cwd: string; env: Record<string, string>; limitSeconds?: number }): Promise<ProcessRun> {
  const script = join(projectRoot, 'src', 'adapters', entry, 'index.ts')
  const started = performance.now()
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      ['--import', tsxLoader, script, ...args],
      { cwd: options.cwd, env: options.env, maxBuffer: 64 * 1024 * 1024, timeout: (options.limitSeconds ?? 60) * 1000, killSignal: 'SIGKILL' },
      (error, stdout, stderr) => {
        const failed = error as (Error & { code?: number | string; killed?: boolean; signal?: string }) | null
        resolve({
          code: failed ? (typeof failed.code === 'number' ? failed.code : -1) : 0,
          stdout,
          stderr,
          seconds: (performance.now() - started) / 1000,
          timedOut: Boolean(failed?.killed || failed?.signal === 'SIGKILL'),
        })
      },
    )
  })
}

/** The environment of a test process: PATH and HOME only, plus `extra`, with tsx resolvable from the project. */
export function baseEnvironment(extra: Record<string, string> = {}): Record<string, string> {
  return { PATH: process.env.PATH ?? '/usr/bin:/bin', HOME: process.env.HOME ?? '/tmp', PLUMBLINE_THREADS: '1', ...extra }
}
