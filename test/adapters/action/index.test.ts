/**
 * End to end: the committed bundle, copied alone (no node_modules anywhere above it), run as the
 * runner runs an action (`node dist/index.js` with GITHUB_* and INPUT_* set, the output and summary
 * files created beforehand) on a shallow clone of a generated repository, against the fake GitHub
 * REST server. dist/ must be current: `npm run build` (CI rebuilds it before the tests).
 */
import { execFile } from 'node:child_process'
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parse } from 'yaml'
import { commentMarker } from '../../../src/adapters/github/comment.ts'
import { buildCourierRepository, courierPullRequestEvent, type CourierRepository } from '../../helpers/courier-repository.ts'
import { readOutputs } from '../../helpers/run-action-bundle.ts'
import { startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..')
const owner = 'northwind-parcel'
const repo = 'late-deliveries'
const token = 'ghs_e2eSecretToken_4f9a1c77b2'
const actionInputs = (parse(readFileSync(join(root, 'action.yml'), 'utf8')) as { inputs: Record<string, { default?: string }> }).inputs

let folder: string
let bundle: string
let repository: CourierRepository
let otherRepositories: CourierRepository[] = []
let fake: FakeGitHub
let runCount = 0
let flakyAndDown: Promise<{ flaky: FakeGitHub; down: FakeGitHub; runs: ActionRun[] }>
const allOutput: string[] = []

beforeAll(async () => {
  if (!existsSync(join(root, 'dist', 'index.js'))) throw new Error('dist/index.js is missing: run npm run build first')
  folder = mkdtempSync(join(tmpdir(), 'plumbline-action-e2e-'))
  cpSync(join(root, 'dist'), join(folder, 'bare', 'dist'), { recursive: true })
  bundle = join(folder, 'bare', 'dist', 'index.js')
  repository = buildCourierRepository()
  fake = await startFakeGitHub({ token, owner, repo, maxPerPage: 2 })
  // These two wait out retries (1 + 4 s for the 502s; 1 + 4 + 9 s for the server that is down), so
  // they start now and run beside the other tests.
  // Each in a clone of its own: two runs must not fetch into, or add worktrees to, the same one.
  otherRepositories = [buildCourierRepository(), buildCourierRepository()]
  const [flakyRepository, downRepository] = otherRepositories
  flakyAndDown = (async () => {
    const flaky = await startFakeGitHub({ token, owner, repo })
    const down = await startFakeGitHub({ token, owner, repo })
    flaky.failNext(2, 502)
    down.setDown(true)
    const runs = await Promise.all([
      runAction({ eventName: 'pull_request', event: pullRequestEvent(18, flakyRepository), apiUrl: flaky.url, workspace: flakyRepository.path }),
      runAction({ eventName: 'pull_request', event: pullRequestEvent(19, downRepository), apiUrl: down.url, workspace: downRepository.path }),
    ])
    return { flaky, down, runs }
  })()
})

afterAll(async () => {
  await fake?.close()
  for (const built of [repository, ...otherRepositories]) if (built) rmSync(built.folder, { recursive: true, force: true })
  if (folder) rmSync(folder, { recursive: true, force: true })
})

interface ActionRun {
  readonly exitCode: number
  readonly stdout: string
  readonly outputs: Record<string, string>
  readonly summary: string
}

function pullRequestEvent(number: number, commits: CourierRepository = repository) {
  return courierPullRequestEvent(number, commits, `${owner}/${repo}`)
}

/** Runs the bundle as the runner would, with every input at its action.yml default unless set. */
function runAction(options: {
  eventName: string
  event: unknown
  apiUrl?: string
  inputs?: Record<string, string>
  workspace?: string
  path?: string
  env?: Record<string, string>
}): Promise<ActionRun> {
  const run = join(folder, `run-${++runCount}`)
  mkdirSync(join(run, 'temp'), { recursive: true })
  const files = { event: join(run, 'event.json'), output: join(run, 'output.txt'), summary: join(run, 'summary.md') }
  writeFileSync(files.event, JSON.stringify(options.event))
  writeFileSync(files.output, '')
  writeFileSync(files.summary, '')
  const workspace = options.workspace ?? repository.path
  const env: Record<string, string> = {
    PATH: options.path ?? process.env.PATH ?? '',
    HOME: process.env.HOME ?? run,
    GITHUB_ACTIONS: 'true',
    GITHUB_EVENT_NAME: options.eventName,
    GITHUB_EVENT_PATH: files.event,
    GITHUB_REPOSITORY: `${owner}/${repo}`,
    GITHUB_API_URL: options.apiUrl ?? fake.url,
    GITHUB_STEP_SUMMARY: files.summary,
    GITHUB_OUTPUT: files.output,
    GITHUB_WORKSPACE: workspace,
    RUNNER_TEMP: join(run, 'temp'),
    ...options.env,
  }
  // As the runner does (and @actions/core's getInput reads): INPUT_ + the name upper-cased, spaces
  // as underscores, dashes kept.
  const inputs: Record<string, string> = {}
  for (const [name, input] of Object.entries(actionInputs)) inputs[name] = input.default ?? ''
  Object.assign(inputs, { token }, options.inputs)
  for (const [name, value] of Object.entries(inputs)) env[`INPUT_${name.replace(/ /g, '_').toUpperCase()}`] = value
  return new Promise((resolve) => {
    execFile(process.execPath, [bundle], { cwd: workspace, env, maxBuffer: 64 * 1024 * 1024 }, (error, stdout, stderr) => {
      const text = `${stdout}${stderr}`
      allOutput.push(text, readFileSync(files.summary, 'utf8'))
      resolve({
        exitCode: error ? Number((error as { code?: number }).code ?? 1) : 0,
        stdout: text,
        outputs: readOutputs(readFileSync(files.output, 'utf8')),
        summary: readFileSync(files.summary, 'utf8'),
      })
    })
  })
}

describe('node dist/index.js (the action, end to end)', () => {
  let firstRun: ActionRun
  let firstComment: string

  it('on a pull request: fetches the head, blocks the leak, creates the comment, writes outputs and summary, exits non-zero', async () => {
    firstRun = await runAction({ eventName: 'pull_request', event: pullRequestEvent(17) })
    expect(firstRun.exitCode).toBe(1)
    expect(firstRun.stdout).toContain(`Fetched ${repository.headSha.slice(0, 12)} (the head, from the pull_request event) from origin (depth 1): the checkout did not have it.`)
    const comments = fake.comments.get(17) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body.startsWith(commentMarker)).toBe(true)
    expect(comments[0].body).toContain('final\\_scan\\_delay\\_h')
    firstComment = comments[0].body
    expect(firstRun.outputs.verdict).toBe('block')
    expect(Number(firstRun.outputs.blocking)).toBeGreaterThanOrEqual(1)
    const report = JSON.parse(readFileSync(firstRun.outputs['report-json'], 'utf8'))
    expect(report.verdict).toBe('block')
    expect(report.sides.head.commit).toBe(repository.headSha)
    expect(firstRun.outputs.warnings).toBe(String(report.findings.filter((f: { severity: string }) => f.severity === 'warn').length))
    expect(readFileSync(firstRun.outputs['report-markdown'], 'utf8')).toContain(report.headline.split(':')[0])
    expect(firstRun.summary).toContain(commentMarker)
    expect(firstRun.summary).toContain('final\\_scan\\_delay\\_h')
    expect(firstRun.stdout).toContain(`::error::${report.headline}`)
    expect(readFileSync(firstRun.outputs['report-html'], 'utf8').startsWith('<!DOCTYPE html>')).toBe(true)
    expect(firstRun.stdout).toContain('No HTML report artifact: this run has no Actions runtime')
  })

  it('updates the same comment on the second run', async () => {
    const id = fake.comments.get(17)?.[0].id
    // With an Actions runtime whose results service refuses the upload (the fake answers 401 to the
    // artifact client's CreateArtifact): a warning, and the same verdict, comment and outputs.
    const claims = Buffer.from(JSON.stringify({ scp: 'Actions.Results:ce7f54c7-61c7-4aae-887f-30da475f5f1a:ca395085-040a-526b-2ce8-bdc85f692774' })).toString('base64url')
    const second = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(17),
      env: { ACTIONS_RUNTIME_TOKEN: `e30.${claims}.c2ln`, ACTIONS_RESULTS_URL: `${fake.url}/`, GITHUB_RUN_ID: '555' },
    })
    expect(second.exitCode).toBe(1)
    expect(second.stdout).toMatch(/::warning::Could not upload the HTML report as the artifact 'plumbline-report': .*401/)
    expect(second.outputs.verdict).toBe('block')
    expect(fake.requests).toContainEqual({ method: 'POST', path: '/twirp/github.actions.results.api.v1.ArtifactService/CreateArtifact', status: 401 })
    expect(fake.comments.get(17)?.map((c) => c.id)).toEqual([id])
    expect(second.stdout).toContain(`Updated the comment on #17: https://github.example/${owner}/${repo}/pull/17#issuecomment-${id}`)
  })

  it('still posts the comment when the server answers 502 twice; with the server down, the verdict still fails the step', async () => {
    const { flaky, down, runs } = await flakyAndDown
    try {
      const [flakyRun, downRun] = runs
      expect(flaky.requests.slice(0, 3).map((r) => r.status)).toEqual([502, 502, 200])
      expect(flaky.comments.get(18)).toHaveLength(1)
      expect(flakyRun.stdout).toContain('Created the comment on #18')
      expect(flakyRun.exitCode).toBe(1)

      expect(downRun.exitCode).toBe(1)
      expect(downRun.outputs.verdict).toBe('block')
      expect(downRun.stdout).toMatch(/::warning::Could not post the pull-request comment on #19: other side closed \(HTTP 500\)\. The verdict \(block\) is unchanged/)
      expect(downRun.summary).toMatch(/^> \[!WARNING\]\n> The pull-request comment could not be posted/)
      expect(downRun.stdout).toContain('::error::Blocked')
    } finally {
      await Promise.all([flaky.close(), down.close()])
    }
  })

  it('publish mode: posts the report a pull_request job wrote, on the fork’s pull request, without git', async () => {
    const published = join(folder, 'published')
    mkdirSync(join(published, 'plumbline-report'), { recursive: true })
    cpSync(firstRun.outputs['report-json'], join(published, 'plumbline-report', 'report.json'))
    fake.pulls.push({ number: 23, state: 'open', head: { sha: repository.headSha, ref: 'add-scan-delay', label: 'stranger:add-scan-delay' } })
    const workflowRun = {
      action: 'completed',
      workflow_run: {
        id: 777001,
        event: 'pull_request',
        head_sha: repository.headSha,
        head_branch: 'add-scan-delay',
        head_repository: { full_name: 'stranger/late-deliveries', owner: { login: 'stranger' } },
        pull_requests: [],
      },
      repository: { id: 4242, full_name: `${owner}/${repo}` },
    }
    // An empty PATH: any git (or other program) the mode tried to run would fail the run.
    const emptyBin = join(folder, 'empty-bin')
    mkdirSync(emptyBin, { recursive: true })
    const run = await runAction({
      eventName: 'workflow_run',
      event: workflowRun,
      inputs: { mode: 'publish', report: 'plumbline-report/report.json' },
      workspace: published,
      path: emptyBin,
    })
    expect(run.exitCode).toBe(1)
    expect(run.outputs.verdict).toBe('block')
    expect(fake.comments.get(23)).toHaveLength(1)
    // Read back from JSON (NaN written as null), the report renders to the very comment the check posted.
    expect(fake.comments.get(23)?.[0].body).toBe(firstComment)
    expect(run.stdout).toContain('No repository code and no git run in this mode.')

    const tampered = JSON.parse(readFileSync(join(published, 'plumbline-report', 'report.json'), 'utf8'))
    tampered.findings[0].severity = 'harmless'
    writeFileSync(join(published, 'plumbline-report', 'report.json'), JSON.stringify(tampered))
    const rejected = await runAction({
      eventName: 'workflow_run',
      event: workflowRun,
      inputs: { mode: 'publish', report: 'plumbline-report/report.json' },
      workspace: published,
      path: emptyBin,
    })
    expect(rejected.exitCode).toBe(1)
    expect(rejected.outputs.verdict).toBe('error')
    expect(rejected.stdout).toContain('plumbline-report/report.json is not a valid plumbline report (schema version 1), 1 problem:%0A  findings[0].severity: ')
    expect(fake.comments.get(23)).toHaveLength(1)
    expect(fake.comments.get(23)?.[0].body).toContain('No verdict')
  })

  it('loads an ONNX model through the native binding carried in dist/native, outside a pull request', async () => {
    const onnx = buildCourierRepository({ model: 'onnx' })
    otherRepositories.push(onnx)
    const run = await runAction({
      eventName: 'workflow_dispatch',
      event: { inputs: {}, ref: 'refs/heads/main' },
      inputs: { base: 'main', head: 'add-scan-delay' },
      workspace: onnx.path,
    })
    expect(run.stdout).toContain('base: loaded ONNX model models/late.onnx')
    expect(run.stdout).toContain(`Fetched add-scan-delay (the head, from input 'head') from origin (depth 1), commit ${onnx.headSha.slice(0, 12)}`)
    expect(run.stdout).toContain('No pull-request comment: a workflow_dispatch is not a pull request.')
    // The head changes the policy file: a warning, which does not fail the step under 'fail-on: block'.
    expect(run.outputs.verdict).toBe('warn')
    expect(run.exitCode).toBe(0)
    expect(run.summary).toContain(commentMarker)
  })

  it('never prints the token, except to mask it', () => {
    const leaks = allOutput
      .flatMap((text) => text.split('\n'))
      .filter((line) => line.includes(token) && line !== `::add-mask::${token}`)
    expect(leaks).toEqual([])
    for (const comments of fake.comments.values()) for (const comment of comments) expect(comment.body).not.toContain(token)
    expect(allOutput.filter((text) => text.includes(`::add-mask::${token}`)).length).toBe(7)
  })
})
