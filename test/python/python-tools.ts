/**
 * What the Python tests share: Debian's /usr/bin/python3 (python3-sklearn 1.2.1, python3-onnx 1.12,
 * NumPy; not the `python3` on PATH), whether it can run them, and the courier demo data written by
 * the sample repository's own scripts.
 */
import { execFile, execFileSync } from 'node:child_process'
import { existsSync, mkdirSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'

export const python = '/usr/bin/python3'
export const sampleRepository = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'sample-repo')
export const trainScript = join(sampleRepository, 'python', 'train.py')

/** Why the Python tests cannot run on this machine, or undefined when they can. */
export const pythonMissing: string | undefined = findPythonProblem()

function findPythonProblem(): string | undefined {
  if (!existsSync(python)) return `${python} does not exist (install Debian's python3-sklearn and python3-onnx; .ci/run does)`
  try {
    execFileSync(python, ['-c', 'import sklearn, onnx, numpy'], { stdio: 'pipe' })
    return undefined
  } catch {
    return `${python} cannot import sklearn, onnx and numpy (install Debian's python3-sklearn and python3-onnx; .ci/run does)`
  }
}

/** Prints why a Python test file is skipped, so that a skip is never silent. */
export function reportSkip(file: string): void {
  if (pythonMissing !== undefined) process.stderr.write(`${file}: skipped, because ${pythonMissing}\n`)
}

const execFileAsync = promisify(execFile)

/** Runs /usr/bin/python3 -B (no __pycache__ written into the source tree) and returns its stdout. */
export async function runPython(args: readonly string[], options: { cwd: string; env?: Record<string, string> }): Promise<string> {
  try {
    const { stdout } = await execFileAsync(python, ['-B', ...args], {
      cwd: options.cwd,
      env: { ...process.env, ...options.env },
      maxBuffer: 64 * 1024 * 1024,
    })
    return stdout
  } catch (error) {
    const failed = error as { stderr?: string; message: string }
    throw new Error(`${python} ${args.join(' ')} failed: ${failed.message}\n${failed.stderr ?? ''}`)
  }
}

/** Writes data/train.csv and data/holdout.csv into `directory` with the sample repository's scripts. */
export function writeCourierData(directory: string): void {
  mkdirSync(directory, { recursive: true })
  for (const script of ['make-deliveries.mjs', 'build-features.mjs']) {
    execFileSync(process.execPath, [join(sampleRepository, 'scripts', script)], { cwd: directory, stdio: 'pipe' })
  }
}
