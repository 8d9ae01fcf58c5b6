/**
 * Runs a built action bundle (`node dist/index.js`) as the runner runs an action: GITHUB_* and
 * INPUT_* set (every input at its action.yml default unless given), the event, output and summary
 * files created beforehand in a folder of the run's own, with RUNNER_TEMP inside it.
 */
import { execFile } from 'node:child_process'
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { parse } from 'yaml'
import { projectRoot } from './run-process.ts'

const actionInputs = (parse(readFileSync(join(projectRoot, 'action.yml'), 'utf8')) as { inputs: Record<string, { default?: string }> }).inputs

export interface BundleRun {
  readonly exitCode: number
  /** stdout then stderr. */
  readonly output: string
  readonly outputs: Record<string, string>
  readonly summary: string
}

/** Reads GITHUB_OUTPUT as @actions/core writes it: `name<<delimiter`, the value, the delimiter. */
export function readOutputs(text: string): Record<string, string> {
  const outputs: Record<string, string> = {}
  const lines = text.split('\n')
  for (let i = 0; i < lines.length; i++) {
    const match = lines[i].match(/^([^<]+)<<(.+)$/)
    if (!match) continue
    const value: string[] = []
    for (i++; i < lines.length && lines[i] !== match[2]; i++) value.push(lines[i])
    outputs[match[1]] = value.join('\n')
  }
  return outputs
}

export function runActionBundle(options: {
  /** The node binary. */
  readonly node: string
  readonly bundle: string
  /** A new folder for this run's files. */
  readonly runFolder: string
  readonly eventName: string
  readonly event: unknown
  readonly repository: string
  readonly apiUrl: string
  readonly workspace: string
  readonly inputs: Record<string, string>
  /** More environment variables (an Actions runtime). */
  readonly env?: Record<string, string>
}): Promise<BundleRun> {
  const run = options.runFolder
  mkdirSync(join(run, 'temp'), { recursive: true })
  const files = { event: join(run, 'event.json'), output: join(run, 'output.txt'), summary: join(run, 'summary.md') }
  writeFileSync(files.event, JSON.stringify(options.event))
  writeFileSync(files.output, '')
  writeFileSync(files.summary, '')
  const env: Record<string, string> = {
    PATH: process.env.PATH ?? '',
    HOME: process.env.HOME ?? run,
    GITHUB_ACTIONS: 'true',
    GITHUB_EVENT_NAME: options.eventName,
    GITHUB_EVENT_PATH: files.event,
    GITHUB_REPOSITORY: options.repository,
    GITHUB_API_URL: options.apiUrl,
    GITHUB_STEP_SUMMARY: files.summary,
    GITHUB_OUTPUT: files.output,
    GITHUB_WORKSPACE: options.workspace,
    RUNNER_TEMP: join(run, 'temp'),
    ...options.env,
  }
  const inputs: Record<string, string> = {}
  for (const [name, input] of Object.entries(actionInputs)) inputs[name] = input.default ?? ''
  Object.assign(inputs, options.inputs)
  for (const [name, value] of Object.entries(inputs)) env[`INPUT_${name.replace(/ /g, '_').toUpperCase()}`] = value
  return new Promise((resolve) => {
    execFile(options.node, [options.bundle], { cwd: options.workspace, env, maxBuffer: 64 * 1024 * 1024, timeout: 300_000, killSignal: 'SIGKILL' }, (error, stdout, stderr) => {
      resolve({
        exitCode: error ? Number((error as { code?: number }).code ?? 1) : 0,
        output: `${stdout}${stderr}`,
        outputs: readOutputs(readFileSync(files.output, 'utf8')),
        summary: readFileSync(files.summary, 'utf8'),
      })
    })
  })
}
