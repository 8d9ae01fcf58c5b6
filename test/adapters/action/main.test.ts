import { DefaultArtifactClient } from '@actions/artifact'
import { getOctokit } from '@actions/github'
import { retry } from '@octokit/plugin-retry'
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, existsSync, mkdirSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { parse } from 'yaml'
import { run, type ActionDependencies } from '../../../src/adapters/action/main.ts'
import { runCheck, type CheckRequest } from '../../../src/adapters/check/run-check.ts'
import { runMerge, runPlan, runShard } from '../../../src/adapters/check/run-shards.ts'
import { commentMarker } from '../../../src/adapters/github/comment.ts'
import type { FetchCommitRequest } from '../../../src/adapters/github/fetch-base.ts'
import { UserError } from '../../../src/core/errors.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { courierReport, oversizedReport } from '../../core/report/courier-report.ts'
import { githubCommentLimit, startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'
import type { CacheClient } from '../../../src/adapters/action/actions-cache-store.ts'
import { deterministic } from '../../helpers/deterministic-report.ts'
import { folderCacheClient } from '../../helpers/folder-cache-client.ts'
import { baseFiles, makeRepository, smallPolicy, type TestRepository } from '../../helpers/make-repository.ts'

const owner = 'northwind-parcel'
const repo = 'late-deliveries'
const token = 'ghs_maintesttoken0123456789'
const baseSha = '1f0c2d3e4b5a69788796a5b4c3d2e1f0a9b8c7d6'
const headSha = '9a8b7c6d5e4f30211203f4e5d6c7b8a9f0e1d2c3'
const repository = { id: 4242, full_name: `${owner}/${repo}`, owner: { login: owner } }
const fork = { id: 9001, full_name: 'stranger/late-deliveries', owner: { login: 'stranger' } }
const actionInputs = (parse(readFileSync(new URL('../../../action.yml', import.meta.url), 'utf8')) as { inputs: Record<string, { default?: string }> }).inputs

function pullRequestEvent(headRepo: unknown = repository) {
  return {
    action: 'opened',
    number: 17,
    pull_request: { number: 17, base: { sha: baseSha, repo: repository }, head: { sha: headSha, ref: 'add-roadworks', repo: headRepo } },
    repository,
  }
}

interface Recorded {
  lines: string[]
  warnings: string[]
  failures: string[]
  secrets: string[]
  outputs: Record<string, string>
  summary: string[]
  checks: CheckRequest[]
  fetches: FetchCommitRequest[]
}

let folder: string
let fake: FakeGitHub
/** What the last runAction masked, kept when run(deps) throws. */
let maskedBeforeFailure: string[] = []
beforeEach(async () => {
  folder = mkdtempSync(join(tmpdir(), 'plumbline-action-'))
  mkdirSync(join(folder, 'workspace'))
  mkdirSync(join(folder, 'runner-temp'))
  fake = await startFakeGitHub({ token, owner, repo, maxPerPage: 30 })
})
afterEach(async () => {
  await fake.close()
  rmSync(folder, { recursive: true, force: true })
})

/**
 * Runs the action with a fake core, the fake server behind a retrying client (no throttling
 * plugin: its process-wide write queue would space these tests' writes seconds apart), and a
 * `check` that returns `report` or throws.
 */
async function runAction(options: {
  eventName: string
  event: unknown
  inputs?: Record<string, string>
  check?: () => Promise<GateReport>
  env?: Record<string, string>
  upload?: ActionDependencies['uploadArtifact']
  /** The real check instead of `check` (a test repository as the workspace). */
  realCheck?: boolean
  loadCacheClient?: ActionDependencies['loadCacheClient']
}): Promise<Recorded> {
  const recorded: Recorded = { lines: [], warnings: [], failures: [], secrets: [], outputs: {}, summary: [], checks: [], fetches: [] }
  maskedBeforeFailure = recorded.secrets
  const eventPath = join(folder, 'event.json')
  writeFileSync(eventPath, JSON.stringify(options.event))
  const inputs: Record<string, string> = {}
  for (const [name, input] of Object.entries(actionInputs)) inputs[name] = input.default ?? ''
  Object.assign(inputs, { token }, options.inputs)
  const deps: ActionDependencies = {
    core: {
      getInput: (name) => inputs[name] ?? '',
      info: (message) => recorded.lines.push(message),
      warning: (message) => recorded.warnings.push(message),
      setSecret: (secret) => recorded.secrets.push(secret),
      setOutput: (name, value) => {
        recorded.outputs[name] = value
      },
      setFailed: (message) => recorded.failures.push(message),
      group: async (name, fn) => {
        recorded.lines.push(`[group] ${name}`)
        return fn()
      },
      appendSummary: async (markdown) => {
        recorded.summary.push(markdown)
      },
    },
    env: {
      GITHUB_EVENT_NAME: options.eventName,
      GITHUB_EVENT_PATH: eventPath,
      GITHUB_REPOSITORY: `${owner}/${repo}`,
      GITHUB_API_URL: fake.url,
      GITHUB_WORKSPACE: join(folder, 'workspace'),
      RUNNER_TEMP: join(folder, 'runner-temp'),
      ...options.env,
    },
    cwd: folder,
    createClient: (clientToken, clientOptions) =>
      getOctokit(clientToken, { baseUrl: clientOptions.baseUrl, retry: { retryAfterBaseValue: 1 } }, retry),
    runCheck: async (request) => {
      recorded.checks.push(request)
      if (options.realCheck) return runCheck(request)
      if (!options.check) throw new Error('runCheck must not be called here')
      return options.check()
    },
    fetchBase: async (request) => {
      recorded.fetches.push(request)
      return request.ref
    },
    ...(options.upload ? { uploadArtifact: options.upload } : {}),
    runPlan,
    runShard,
    runMerge,
    ...(options.loadCacheClient ? { loadCacheClient: options.loadCacheClient } : {}),
  }
  await run(deps)
  return recorded
}

describe('run(deps) in check mode', () => {
  it('on a pull request: checks base against head from the event, comments, writes the summary and outputs, fails on block', async () => {
    const report = courierReport()
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), check: async () => report })

    expect(result.secrets).toEqual([token])
    expect(result.fetches.map((f) => [f.ref, f.label])).toEqual([
      [baseSha, 'the base, from the pull_request event'],
      [headSha, 'the head, from the pull_request event'],
    ])
    expect(result.checks).toHaveLength(1)
    expect(result.checks[0]).toMatchObject({ cwd: join(folder, 'workspace'), policyPath: 'plumbline.yml', baseRef: baseSha, headRef: headSha })

    const comments = fake.comments.get(17) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body.startsWith(`${commentMarker}\n`)).toBe(true)
    expect(comments[0].body).toContain('delivered\\_at\\_hour')

    const jsonPath = join(folder, 'runner-temp', 'plumbline', 'report.json')
    const markdownPath = join(folder, 'runner-temp', 'plumbline', 'report.md')
    const htmlPath = join(folder, 'runner-temp', 'plumbline', 'report.html')
    expect(result.outputs).toEqual({ verdict: 'block', blocking: '1', warnings: '2', infos: '2', 'report-json': jsonPath, 'report-markdown': markdownPath, 'report-html': htmlPath })
    expect(readFileSync(htmlPath, 'utf8').startsWith('<!DOCTYPE html>')).toBe(true)
    expect(JSON.parse(readFileSync(jsonPath, 'utf8')).headline).toBe(report.headline)
    expect(result.summary).toEqual([`${readFileSync(markdownPath, 'utf8')}\n`])
    expect(result.failures).toEqual([report.headline])
    expect(result.lines).toContain('[group] Configuration')
    expect(result.lines).toContain(`Base: ${baseSha} (from the pull_request event)`)
    expect(result.lines.join('\n')).not.toContain(token)
  })

  it('uploads the HTML report as an artifact and links it from the comment', async () => {
    const uploads: string[][] = []
    const result = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      check: async () => courierReport(),
      env: { ACTIONS_RUNTIME_TOKEN: 'runtime', ACTIONS_RESULTS_URL: 'http://127.0.0.1:9/', GITHUB_SERVER_URL: 'https://github.com', GITHUB_RUN_ID: '555' },
      upload: async (name, file, rootDirectory) => {
        uploads.push([name, file, rootDirectory])
        return { id: 77 }
      },
    })
    const htmlPath = join(folder, 'runner-temp', 'plumbline', 'report.html')
    expect(uploads).toEqual([['plumbline-report', htmlPath, join(folder, 'runner-temp', 'plumbline')]])
    expect(fake.comments.get(17)?.[0].body).toContain(
      `[download it from the workflow run](https://github.com/${owner}/${repo}/actions/runs/555/artifacts/77)`,
    )
    expect(result.warnings).toEqual([])
  })

  it('keeps the verdict, the comment and the outputs when the artifact upload fails (the real client against a refusing server)', async () => {
    // @actions/artifact 6.2.1 reads its runtime from process.env; a JWT with the Actions.Results
    // scope it parses for the run's backend ids (unsigned: the fake server never checks it).
    const claims = Buffer.from(JSON.stringify({ scp: 'Actions.Results:ce7f54c7-61c7-4aae-887f-30da475f5f1a:ca395085-040a-526b-2ce8-bdc85f692774' })).toString('base64url')
    const runtime = { ACTIONS_RUNTIME_TOKEN: `e30.${claims}.c2ln`, ACTIONS_RESULTS_URL: `${fake.url}/`, GITHUB_SERVER_URL: 'https://github.com', GITHUB_RUN_ID: '555' }
    const saved = Object.fromEntries(Object.keys(runtime).map((k) => [k, process.env[k]]))
    Object.assign(process.env, runtime)
    try {
      const result = await runAction({
        eventName: 'pull_request',
        event: pullRequestEvent(),
        check: async () => courierReport(),
        env: runtime,
        upload: (name, file, rootDirectory) => new DefaultArtifactClient().uploadArtifact(name, [file], rootDirectory),
      })
      expect(result.warnings).toHaveLength(1)
      expect(result.warnings[0]).toMatch(/^Could not upload the HTML report as the artifact 'plumbline-report': .+\. The verdict is unchanged; the comment has no link to it, and the file is at .+report\.html\.$/)
      expect(result.outputs.verdict).toBe('block')
      expect(result.failures).toEqual([courierReport().headline])
      const body = fake.comments.get(17)?.[0].body ?? ''
      expect(body).toContain('### plumbline: block')
      expect(body).not.toContain('download it from the workflow run')
      // The upload reached the results service and was refused there.
      expect(fake.requests).toContainEqual({ method: 'POST', path: '/twirp/github.actions.results.api.v1.ArtifactService/CreateArtifact', status: 401 })
    } finally {
      for (const [k, v] of Object.entries(saved)) {
        if (v === undefined) delete process.env[k]
        else process.env[k] = v
      }
    }
  })

  it('updates the same comment on a rerun', async () => {
    const first = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), check: async () => courierReport() })
    const id = fake.comments.get(17)?.[0].id
    await runAction({ eventName: 'pull_request', event: pullRequestEvent(), check: async () => courierReport() })
    expect(fake.comments.get(17)?.map((c) => c.id)).toEqual([id])
    expect(first.lines.some((l) => l.startsWith('Created the comment on #17'))).toBe(true)
  })

  it("does not fail the step on block when 'fail-on' is never, and fails on warn when it is warn", async () => {
    const blocked = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { 'fail-on': 'never' }, check: async () => courierReport() })
    expect(blocked.failures).toEqual([])
    const warned: GateReport = { ...courierReport(), verdict: 'warn', headline: 'Passed with warnings: two ranks moved.', findings: courierReport().findings.filter((f) => f.severity !== 'block') }
    const warnedRun = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { 'fail-on': 'warn' }, check: async () => warned })
    expect(warnedRun.failures).toEqual(['Passed with warnings: two ranks moved.'])
  })

  it('keeps the comment under GitHub’s 65,536 characters for thousands of features and findings', async () => {
    await runAction({ eventName: 'pull_request', event: pullRequestEvent(), check: async () => oversizedReport(5000, 400) })
    const body = fake.comments.get(17)?.[0].body ?? ''
    expect(body.length).toBeGreaterThan(30_000)
    expect(body.length).toBeLessThanOrEqual(githubCommentLimit)
  })

  it('turns a failed run into an error report: comment saying no verdict, outputs, failed step', async () => {
    const result = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      check: async () => {
        throw new UserError('No policy file at plumbline.yml (looked in /checkout).', "Create one with 'plumbline init'.")
      },
    })
    expect(result.outputs.verdict).toBe('error')
    expect(result.outputs.blocking).toBe('1')
    const body = fake.comments.get(17)?.[0].body ?? ''
    expect(body).toContain('No verdict')
    expect(result.failures).toEqual([
      "No verdict: the check could not run (No policy file at plumbline.yml (looked in /checkout)).\nNo policy file at plumbline.yml (looked in /checkout).\nCreate one with 'plumbline init'.",
    ])
  })

  it('refuses a fork head under pull_request_target without running anything, and says why', async () => {
    const result = await runAction({ eventName: 'pull_request_target', event: pullRequestEvent(fork), check: async () => courierReport() })
    expect(result.checks).toEqual([])
    expect(result.fetches).toEqual([])
    expect(result.failures).toHaveLength(1)
    expect(result.failures[0]).toBe(
      "No verdict: the check could not run (Refusing to run the check on a head from a fork under pull_request_target: the check runs the repository's prepare and training commands, and this job holds a write token and the repository secrets, so code from a stranger's branch would run with them).\n" +
        "Refusing to run the check on a head from a fork under pull_request_target: the check runs the repository's prepare and training commands, and this job holds a write token and the repository secrets, so code from a stranger's branch would run with them.\n" +
        "Run the check in a pull_request workflow and publish its report with 'mode: publish' from a workflow_run workflow (docs/action.md), or set 'allow-fork-code: true' on this step if you accept that risk.",
    )
    expect(fake.comments.get(17)?.[0].body).toContain('No verdict')
  })

  it("runs a fork head under pull_request_target when 'allow-fork-code' is true", async () => {
    const result = await runAction({ eventName: 'pull_request_target', event: pullRequestEvent(fork), inputs: { 'allow-fork-code': 'true' }, check: async () => courierReport() })
    expect(result.checks).toHaveLength(1)
  })

  it('posts no comment for a fork under pull_request (read-only token) and points to publish mode', async () => {
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent(fork), check: async () => courierReport() })
    expect(fake.requests).toEqual([])
    expect(result.lines).toContain(
      "No pull-request comment: the head is in a fork, so this pull_request job's token is read-only; publish the report from a workflow_run job with 'mode: publish' (docs/action.md).",
    )
    expect(result.failures).toEqual([courierReport().headline])
  })

  it('outside a pull request: runs, writes summary and outputs, posts no comment', async () => {
    const push = { ref: 'refs/heads/main', before: baseSha, after: headSha, repository }
    const result = await runAction({ eventName: 'push', event: push, check: async () => courierReport() })
    expect(result.checks[0]).toMatchObject({ baseRef: baseSha, headRef: headSha })
    expect(fake.requests).toEqual([])
    expect(result.summary).toHaveLength(1)
    expect(result.outputs.verdict).toBe('block')
    const dispatch = await runAction({ eventName: 'workflow_dispatch', event: { inputs: {} }, check: async () => courierReport() })
    expect(dispatch.checks[0]).toMatchObject({ baseRef: undefined, headRef: undefined })
    expect(dispatch.fetches).toEqual([])
  })

  it('lets the inputs override the event’s commits', async () => {
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { base: 'origin/main' }, check: async () => courierReport() })
    expect(result.fetches.map((f) => [f.ref, f.label])).toEqual([
      ['origin/main', "the base, from input 'base'"],
      [headSha, 'the head, from the pull_request event'],
    ])
  })

  it('reports a comment that cannot be posted in the log and the summary, and keeps the verdict', async () => {
    fake.setDown(true)
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), check: async () => courierReport() })
    expect(result.warnings).toHaveLength(1)
    expect(result.warnings[0]).toMatch(/^Could not post the pull-request comment on #17: other side closed \(HTTP 500\)\. The verdict \(block\) is unchanged; /)
    expect(result.summary[0]).toMatch(/^> \[!WARNING\]\n> The pull-request comment could not be posted: other side closed \(HTTP 500\)\./)
    expect(result.failures).toEqual([courierReport().headline])
    expect(result.outputs.verdict).toBe('block')
  })

  it("writes a copy of the JSON report where 'report' says", async () => {
    await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { report: 'out/plumbline-report.json' }, check: async () => courierReport() })
    const copy = join(folder, 'workspace', 'out', 'plumbline-report.json')
    expect(readFileSync(copy, 'utf8')).toBe(readFileSync(join(folder, 'runner-temp', 'plumbline', 'report.json'), 'utf8'))
  })
})

describe('run(deps) with a bad input', () => {
  it('masks the token first, then refuses the input with an error verdict, the outputs and the comment on the known pull request', async () => {
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { 'fail-on': 'sometimes' } })
    expect(result.secrets).toEqual([token])
    expect(result.outputs.verdict).toBe('error')
    expect(result.checks).toHaveLength(0)
    expect(result.failures).toHaveLength(1)
    expect(result.failures[0]).toContain("Input 'fail-on' must be one of block, warn, never; got 'sometimes'.")
    const comments = fake.comments.get(17) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body).toContain('No verdict')
  })

  it('a malformed event file still sets the error verdict and fails the step, naming the file', async () => {
    const result = await runAction({ eventName: 'pull_request', event: pullRequestEvent() , env: { GITHUB_EVENT_PATH: join(folder, 'workspace') } })
    expect(result.outputs.verdict).toBe('error')
    expect(result.failures[0]).toContain(`GITHUB_EVENT_PATH (${join(folder, 'workspace')}) is a directory, not a regular file`)
  })
})

describe('run(deps) in publish mode', () => {
  const reportFile = () => join(folder, 'workspace', 'report', 'report.json')
  function writeReport(report: unknown) {
    mkdirSync(join(folder, 'workspace', 'report'), { recursive: true })
    writeFileSync(reportFile(), typeof report === 'string' ? report : JSON.stringify(report))
  }
  function workflowRun(pullRequests: unknown[], headRepository: unknown) {
    return {
      action: 'completed',
      workflow_run: { id: 555001, event: 'pull_request', head_sha: headSha, head_branch: 'add-roadworks', head_repository: headRepository, pull_requests: pullRequests },
      repository,
    }
  }
  const publishInputs = { mode: 'publish', report: 'report/report.json' }

  it('posts a valid report on the pull request GitHub lists, with outputs and step result, running nothing', async () => {
    writeReport(courierReport())
    const listed = { number: 17, head: { sha: headSha, repo: { id: 4242 } }, base: { sha: baseSha, repo: { id: 4242 } } }
    const result = await runAction({ eventName: 'workflow_run', event: workflowRun([listed], repository), inputs: publishInputs })
    expect(result.checks).toEqual([])
    expect(result.fetches).toEqual([])
    expect(fake.comments.get(17)).toHaveLength(1)
    expect(result.outputs).toMatchObject({ verdict: 'block', blocking: '1', warnings: '2', infos: '2' })
    expect(result.failures).toEqual([courierReport().headline])
    expect(result.lines).toContain('No repository code and no git run in this mode.')
  })

  it('finds a fork’s pull request by its head owner, branch and commit', async () => {
    writeReport(courierReport())
    fake.pulls.push(
      { number: 16, state: 'open', head: { sha: baseSha, ref: 'add-roadworks', label: 'stranger:add-roadworks' } },
      { number: 21, state: 'open', head: { sha: headSha, ref: 'add-roadworks', label: 'stranger:add-roadworks' } },
    )
    await runAction({ eventName: 'workflow_run', event: workflowRun([], fork), inputs: publishInputs })
    expect([...fake.comments.keys()]).toEqual([21])
  })

  it('rejects a report that fails the schema, and says no verdict was reached', async () => {
    writeReport({ ...courierReport(), verdict: 'approved' })
    const listed = { number: 17, head: { sha: headSha, repo: { id: 4242 } }, base: { sha: baseSha, repo: { id: 4242 } } }
    const result = await runAction({ eventName: 'workflow_run', event: workflowRun([listed], repository), inputs: publishInputs })
    expect(result.outputs.verdict).toBe('error')
    expect(result.failures).toHaveLength(1)
    expect(result.failures[0]).toContain('report/report.json is not a valid plumbline report (schema version 1), 1 problem:\n  verdict: ')
    expect(fake.comments.get(17)?.[0].body).toContain('No verdict')
  })

  it('rejects a report whose verdict does not follow from its findings', async () => {
    writeReport({ ...courierReport(), verdict: 'pass' })
    const listed = { number: 17, head: { sha: headSha, repo: { id: 4242 } }, base: { sha: baseSha, repo: { id: 4242 } } }
    const result = await runAction({ eventName: 'workflow_run', event: workflowRun([listed], repository), inputs: publishInputs })
    expect(result.outputs.verdict).toBe('error')
    expect(result.failures[0].split('\n').slice(1)).toEqual([
      "report/report.json is not consistent: its verdict is 'pass' but its findings give 'block'.",
      'The file was changed after plumbline wrote it; publish the report file exactly as the run wrote it.',
    ])
  })

  it('names the input when the report file is missing', async () => {
    const result = await runAction({ eventName: 'workflow_run', event: workflowRun([], fork), inputs: publishInputs })
    expect(result.failures[0].split('\n').slice(1)).toEqual([
      `Input 'report': no report file at report/report.json (looked for ${reportFile()}).`,
      'Check that the pull_request job uploaded the report and that the download step put it at this path (see docs/action.md).',
    ])
    expect(existsSync(join(folder, 'runner-temp', 'plumbline', 'report.json'))).toBe(true)
  })
})

describe('run(deps) with the Actions cache (a folder-backed cache client, the real check)', () => {
  let repo: TestRepository
  beforeAll(() => {
    repo = makeRepository({ base: baseFiles({ policy: smallPolicy() }) })
  })
  afterAll(() => repo.remove())

  /**
   * A check of main against pr with 'cache: true' on a fresh runner: an empty RUNNER_TEMP, at the
   * same path on every runner as on GitHub's (the entries' paths are part of their version).
   */
  async function cachedCheck(runner: string, client: () => Promise<CacheClient>) {
    const temp = join(folder, 'runner-temp')
    rmSync(temp, { recursive: true, force: true })
    mkdirSync(temp)
    const result = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      inputs: { base: 'main', head: 'pr', cache: 'true' },
      env: { GITHUB_WORKSPACE: repo.root, RUNNER_TEMP: temp },
      realCheck: true,
      loadCacheClient: client,
    })
    const report = JSON.parse(readFileSync(result.outputs['report-json'], 'utf8')) as GateReport
    expect(runner).not.toBe('')
    return { result, report }
  }

  it('saves every measured unit; a second runner reads them all back and posts the same comment apart from the cache line', async () => {
    const store = folderCacheClient(join(folder, 'store'))
    const first = await cachedCheck('runner-1', async () => store)
    expect(first.report.cache?.reused).toEqual([])
    const measured = first.report.cache?.measured ?? []
    expect(measured.length).toBeGreaterThan(0)
    expect((await store.keys()).every((key) => /^plumbline-unit-[0-9a-f]{64}$/.test(key))).toBe(true)
    expect(await store.keys()).toHaveLength(measured.length)
    expect(first.result.lines).toContain(`Actions cache, this step: 0 unit entries restored, ${measured.length} unit entries saved, 0 failed.`)
    expect(first.result.warnings).toEqual([])

    const second = await cachedCheck('runner-2', async () => store)
    expect(second.report.cache?.measured).toEqual([])
    expect([...(second.report.cache?.reused ?? [])].sort()).toEqual([...measured].sort())
    expect(deterministic(second.report)).toBe(deterministic(first.report))
    expect(second.result.lines).toContain(`Actions cache, this step: ${measured.length} unit entries restored, 0 unit entries saved, 0 failed.`)
    const comment = (fake.comments.get(17) ?? [])[0].body
    expect(comment).toContain(`Work units from the cache: ${measured.length} of ${measured.length}`)
  }, 120_000)

  it('a cache that fails (its folder below a regular file), is missing, or cannot be loaded only warns: the check runs and gives the same verdict', async () => {
    const uncached = await cachedCheck('runner-plain', async () => folderCacheClient(join(folder, 'plain-store')))
    writeFileSync(join(folder, 'not-a-folder'), '')
    const broken = await cachedCheck('runner-broken', async () => folderCacheClient(join(folder, 'not-a-folder', 'store')))
    const units = uncached.report.cache?.measured.length ?? 0
    // One warning per round that failed: a restore and a save for the refits, then for the drop-column refits.
    expect(broken.result.warnings).toHaveLength(4)
    const restore = /^Could not restore (\d+) of \1 unit entries from the Actions cache \(first: plumbline-unit-[0-9a-f]{64}: ENOTDIR: not a directory, .*\)\. Those units are measured here instead; the check still runs\.$/
    const save = /^Could not save (\d+) of \1 unit entries to the Actions cache \(first: plumbline-unit-[0-9a-f]{64}: ENOTDIR: not a directory, .*\)\. A later run measures those units again; the check still runs\.$/
    expect(broken.result.warnings.map((w) => (restore.test(w) ? 'restore' : save.test(w) ? 'save' : w))).toEqual(['restore', 'save', 'restore', 'save'])
    expect(broken.result.warnings.filter((w) => restore.test(w)).reduce((sum, w) => sum + Number(restore.exec(w)?.[1]), 0)).toBe(units)
    expect(broken.result.lines).toContain(`Actions cache, this step: 0 unit entries restored, 0 unit entries saved, ${2 * units} failed.`)
    expect(broken.report.verdict).toBe(uncached.report.verdict)
    expect(deterministic(broken.report)).toBe(deterministic(uncached.report))
    expect(broken.result.failures).toEqual(uncached.result.failures)

    const absent = await cachedCheck('runner-absent', async () => folderCacheClient(join(folder, 'absent-store'), { available: false }))
    expect(absent.result.warnings).toEqual([
      "Input 'cache' is true, but this run has no Actions cache service (ACTIONS_CACHE_URL or ACTIONS_RESULTS_URL is not set). Every unit is measured in this job; the check still runs.",
    ])
    expect(absent.report.verdict).toBe(uncached.report.verdict)

    const unloadable = await cachedCheck('runner-unloadable', async () => {
      throw new Error('Cannot find package @actions/cache')
    })
    expect(unloadable.result.warnings).toEqual(['The Actions cache could not be loaded: Cannot find package @actions/cache. Every unit is measured in this job; the check still runs.'])
    expect(deterministic(unloadable.report)).toBe(deterministic(uncached.report))
  }, 180_000)
})

describe('run(deps) in plan, shard and merge modes (the real command-line code on a test repository)', () => {
  let repo: TestRepository
  beforeAll(() => {
    repo = makeRepository({ base: baseFiles({ policy: smallPolicy() }) })
  })
  afterAll(() => repo.remove())
  const sideInputs = { base: 'main', head: 'pr' }
  const onRepo = () => ({ GITHUB_WORKSPACE: repo.root })

  it('plan sets the matrix and the shard count; shard writes its partial file and names the folder; neither comments', async () => {
    const plan = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { ...sideInputs, mode: 'plan', shards: '2' }, env: onRepo() })
    expect(plan.failures).toEqual([])
    expect(plan.outputs).toEqual({ matrix: '{"shard":[1,2]}', 'shard-count': '2' })
    expect(JSON.parse(plan.outputs.matrix)).toEqual({ shard: [1, 2] })
    const shard = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      inputs: { ...sideInputs, mode: 'shard', shards: '2', shard: '2', 'partial-dir': 'out/refits' },
      env: onRepo(),
    })
    expect(shard.failures).toEqual([])
    expect(shard.outputs).toEqual({ 'partial-dir': join(repo.root, 'out', 'refits') })
    expect(readdirSync(join(repo.root, 'out', 'refits'))).toEqual(['plumbline-partial-refits-2-of-2.json'])
    expect(fake.comments.get(17)).toBeUndefined()
    expect(shard.lines).toContain(`No pull-request comment: a plan or shard step does not comment; the merge step posts the one comment, also when a shard failed.`)
  }, 120_000)

  it('fails the step with the message, never a pass, when a shard cannot run: a folder missing, a folder outside the workspace', async () => {
    const missing = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      inputs: { ...sideInputs, mode: 'shard', shards: '2', shard: '1', after: 'refits-never-downloaded' },
      env: onRepo(),
    })
    expect(missing.failures).toEqual([
      `Input 'after': no folder or file refits-never-downloaded (looked for ${join(repo.root, 'refits-never-downloaded')}).\nDownload every refits shard's artifact into the workspace before this step (actions/download-artifact), and name the folders it wrote.`,
    ])
    expect(missing.outputs).toEqual({})
    expect(missing.summary.join('')).toContain('### plumbline shard failed')
    // A secret in a message of these modes is redacted like any other.
    const secret = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { ...sideInputs, mode: 'shard', shards: '2', shard: '1', after: `refits-${token}` }, env: onRepo() })
    expect(secret.failures[0]).toContain("Input 'after': no folder or file refits-*** (looked for")
    expect([...secret.failures, ...secret.summary].join('\n')).not.toContain(token)
    const outside = await runAction({
      eventName: 'pull_request',
      event: pullRequestEvent(),
      inputs: { ...sideInputs, mode: 'shard', shards: '2', shard: '1', 'partial-dir': '../elsewhere' },
      env: onRepo(),
    })
    expect(outside.failures[0].split('\n')[0]).toBe("Input 'partial-dir' '../elsewhere/plumbline-partial.json' lies outside the workspace; plumbline reads and writes only inside it.")
    const merge = await runAction({ eventName: 'pull_request', event: pullRequestEvent(), inputs: { ...sideInputs, mode: 'merge', partials: '../../etc' }, env: onRepo() })
    expect(merge.outputs.verdict).toBe('error')
    expect(merge.failures[0]).toContain("Input 'partials' '../../etc' lies outside the workspace")
    expect((fake.comments.get(17) ?? [])[0].body).toContain('No verdict')
  }, 120_000)
})
