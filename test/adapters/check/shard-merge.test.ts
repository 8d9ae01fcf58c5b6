/**
 * plan, shard and merge against a check on one machine: the merged report is the check's report
 * byte for byte apart from timings, for 1, 2 and 5 shards, with the built-in learner and with a
 * training command (scikit-learn through sample-repo/python/train.py); and merge refuses
 * incomplete, duplicated and foreign work, naming the unit or file.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runCheck } from '../../../src/adapters/check/run-check.ts'
import { runMerge, runPlan, runShard } from '../../../src/adapters/check/run-shards.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { renderMarkdown } from '../../../src/core/report/render-markdown.ts'
import { baseFiles, parcelsCsv, smallPolicy, standardParcels, type TestRepository, makeRepository } from '../../helpers/make-repository.ts'
import { missingReference } from '../../helpers/reference-packages.ts'
import { baseEnvironment, projectRoot, runSource } from '../../helpers/run-process.ts'
import { UserError } from '../../../src/core/errors.ts'
import { deterministic } from '../../helpers/deterministic-report.ts'

/** The UserError a promise rejects with (a user's mistake, never a stack trace). */
async function userErrorOf(promise: Promise<unknown>): Promise<UserError> {
  const error = await promise.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(error instanceof UserError)) throw new Error(`expected a UserError, got ${String(error)}`)
  return error
}

/** The head adds the leak `scan_delay_h` (known only after delivery), so the verdict is a block with drop-column refits of it. */
function leakRepository(policy: string, extra: Record<string, string> = {}): TestRepository {
  const { train, holdout } = standardParcels()
  const columns = ['parcel_id', 'distance_km', 'stop_count', 'promised_window_h', 'rain_forecast_mm', 'parcel_weight_kg', 'scan_delay_h'] as const
  return makeRepository({
    base: { ...baseFiles({ policy }), ...extra },
    head: { 'data/train.csv': parcelsCsv(train, columns), 'data/holdout.csv': parcelsCsv(holdout, columns) },
  })
}

async function sharded(repo: TestRepository, shards: number, folder: string): Promise<GateReport> {
  const sides = { cwd: repo.root, baseRef: 'main', headRef: 'pr' }
  const refits = join(folder, `refits-${shards}`)
  const drops = join(folder, `drops-${shards}`)
  for (let index = 1; index <= shards; index++) await runShard({ ...sides, index, of: shards, out: refits })
  for (let index = 1; index <= shards; index++) await runShard({ ...sides, index, of: shards, out: drops, after: [refits] })
  return runMerge({ ...sides, dirs: [refits, drops] })
}

describe('plumbline plan, shard and merge (built-in learner)', () => {
  let repo: TestRepository
  let folder: string
  let single: GateReport
  beforeAll(async () => {
    repo = leakRepository(smallPolicy())
    folder = mkdtempSync(join(tmpdir(), 'plumbline-shards-'))
    single = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr' })
  }, 120_000)
  afterAll(() => {
    repo.remove()
    rmSync(folder, { recursive: true, force: true })
  })

  it.each([1, 2, 5])('merges %i shards into the single-machine report, byte for byte apart from timings', async (shards) => {
    const merged = await sharded(repo, shards, folder)
    expect(single.verdict).toBe('block')
    expect(deterministic(merged)).toBe(deterministic(single))
    expect(renderMarkdown({ ...merged, timings: {} })).toBe(renderMarkdown({ ...single, timings: {} }))
    // Every unit ran exactly once over the shards of a stage.
    const ids = readdirSync(join(folder, `refits-${shards}`)).flatMap((name) => JSON.parse(readFileSync(join(folder, `refits-${shards}`, name), 'utf8')).units.map((u: { id: string }) => u.id))
    expect(ids.sort()).toEqual(['base/refit-1', 'base/refit-2', 'base/refit-3', 'head/refit-1', 'head/refit-2', 'head/refit-3'])
    const drops = readdirSync(join(folder, `drops-${shards}`)).flatMap((name) => JSON.parse(readFileSync(join(folder, `drops-${shards}`, name), 'utf8')).units.map((u: { id: string }) => u.id))
    expect(drops.length).toBeGreaterThan(0)
    expect(new Set(drops).size).toBe(drops.length)
  }, 120_000)

  it('plans the matrix and balances the units by estimated cost', async () => {
    const plan = await runPlan({ cwd: repo.root, baseRef: 'main', headRef: 'pr', shards: 4 })
    expect(plan.matrix).toEqual({ shard: [1, 2, 3, 4] })
    // Six refit units over four shards by the longest-processing-time rule: the three head refits
    // (six features) are costlier than the base ones (five), and two base refits cost more than one
    // head refit, so the makespan is a head plus a base refit, the best any split of these six can do.
    expect(plan.summary.map((line) => line.replace(/ \(\d+% of the estimated cost\)/, ''))).toEqual([
      'shard 1 of 4: 2 refit units: base/refit-3, head/refit-1',
      'shard 2 of 4: 1 refit unit: head/refit-2',
      'shard 3 of 4: 1 refit unit: head/refit-3',
      'shard 4 of 4: 2 refit units: base/refit-1, base/refit-2',
    ])
    expect(plan.file.stages[1]).toEqual({ stage: 'drop-columns', decidedAfter: 'refits', perSide: { base: { refits: 3, top: 1, also: [] }, head: { refits: 3, top: 1, also: ['scan_delay_h'] } } })
  }, 60_000)

  it('refuses a merge with a unit missing, naming the unit and the shard that runs it', async () => {
    const refits = join(folder, 'refits-2')
    const drops = join(folder, 'drops-2')
    const partial = join(folder, 'incomplete')
    rmSync(partial, { recursive: true, force: true })
    await runShard({ cwd: repo.root, baseRef: 'main', headRef: 'pr', index: 1, of: 2, out: partial })
    const error = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [partial, drops] }))
    expect(error.message).toMatch(/^Unit (base|head)\/refit-\d is missing: shard 2 of 2 of the refits stage runs it, and no partial file given has it\. No report was written\.$/)
    const noDrops = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [refits] }))
    expect(noDrops.message).toBe('Unit base/refit-1/without/distance_km is missing: no partial result file of the drop-columns stage was given. No report was written.')
  }, 60_000)

  it('refuses a unit given twice, naming both files', async () => {
    const refits = join(folder, 'refits-1')
    const copy = join(folder, 'copy')
    rmSync(copy, { recursive: true, force: true })
    await runShard({ cwd: repo.root, baseRef: 'main', headRef: 'pr', index: 1, of: 1, out: copy })
    const error = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [refits, copy, join(folder, 'drops-1')] }))
    expect(error.message).toBe(
      `Unit base/refit-1 is in two partial results: ${join(refits, 'plumbline-partial-refits-1-of-1.json')} and ${join(copy, 'plumbline-partial-refits-1-of-1.json')}. No report was written.`,
    )
  }, 60_000)

  it('refuses the same folder or file given twice before opening either side', async () => {
    const refits = join(folder, 'refits-1')
    const file = join(refits, 'plumbline-partial-refits-1-of-1.json')
    const twice = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'no-such-branch', dirs: [refits, `${refits}/`] }))
    // The head ref does not exist: the folders were checked first.
    expect(twice.message).toBe(`${file} is given twice (through ${refits} and ${refits}/); each partial result may be merged once.`)
    const fileAndFolder = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [refits, file] }))
    expect(fileAndFolder.message).toBe(`${file} is given twice (through ${refits} and ${file}); each partial result may be merged once.`)
  })

  it('refuses a partial file of another commit, policy or version, and a malformed one, through the CLI (exit 2)', async () => {
    const refits = join(folder, 'refits-1')
    const drops = join(folder, 'drops-1')
    // Against the base as its own head: the head commit differs.
    const foreign = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'main', dirs: [refits, drops] }))
    expect(foreign.message).toBe(
      `${join(refits, 'plumbline-partial-refits-1-of-1.json')} is from another run: it was measured on head commit ${repo.headCommit}, this run's head is ${repo.baseCommit}. No report was written.`,
    )
    const edited = join(folder, 'edited')
    rmSync(edited, { recursive: true, force: true })
    await runShard({ cwd: repo.root, baseRef: 'main', headRef: 'pr', index: 1, of: 1, out: edited })
    const path = join(edited, 'plumbline-partial-refits-1-of-1.json')
    const file = JSON.parse(readFileSync(path, 'utf8'))
    writeFileSync(path, JSON.stringify({ ...file, inputs: { ...file.inputs, toolVersion: '0.0.9' } }))
    const version = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [edited, drops] }))
    expect(version.message).toBe(`${path} is from another run: plumbline 0.0.9 wrote it; this is plumbline 0.1.0. No report was written.`)
    file.units[0].result.refit.score = 'a lot'
    writeFileSync(path, JSON.stringify(file))
    const run = await runSource('cli', ['merge', '--base', 'main', '--head', 'pr', edited, drops], { cwd: repo.root, env: baseEnvironment(), limitSeconds: 60 })
    expect(run.code).toBe(2)
    expect(run.stderr).toContain(`${path} is not a valid partial result file: units.0.result.refit.score: `)
    expect(run.stderr).not.toMatch(/\n\s+at /)
  }, 60_000)

  it('refuses a unit that is not part of the plan (a shard of another split)', async () => {
    // Stage-1 files of 2 shards plus a stage-2 file whose drop-column units come from a tampered ranking.
    const drops = join(folder, 'drops-1')
    const tampered = join(folder, 'tampered')
    rmSync(tampered, { recursive: true, force: true })
    await runShard({ cwd: repo.root, baseRef: 'main', headRef: 'pr', index: 1, of: 1, out: tampered, after: [join(folder, 'refits-1')] })
    const path = join(tampered, 'plumbline-partial-drop-columns-1-of-1.json')
    const file = JSON.parse(readFileSync(path, 'utf8'))
    file.units.push({ ...file.units[0], id: 'base/refit-1/without/parcel_weight_kg', feature: 'parcel_weight_kg' })
    writeFileSync(path, JSON.stringify(file))
    const error = await userErrorOf(runMerge({ cwd: repo.root, baseRef: 'main', headRef: 'pr', dirs: [join(folder, 'refits-1'), tampered] }))
    expect(error.message).toBe(`Unit base/refit-1/without/parcel_weight_kg in ${path} is not part of this run's plan. No report was written.`)
    void drops
  }, 60_000)
})

describe('plumbline plan, shard, merge and --cache with a feature group (grouped drop-column units)', () => {
  let repo: TestRepository
  let folder: string
  let single: GateReport
  beforeAll(async () => {
    // The policy group route is above the floor on the base, so the base refits without both its
    // members at once (drop_group_top 1), and without each member alone (the drill-down).
    repo = leakRepository(smallPolicy({ extra: '  groups:\n    route: [distance_km, stop_count]\n' }))
    folder = mkdtempSync(join(tmpdir(), 'plumbline-shards-groups-'))
    single = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr' })
  }, 120_000)
  afterAll(() => {
    repo.remove()
    rmSync(folder, { recursive: true, force: true })
  })

  it('merges 2 shards, group units included, into the single-machine report, byte for byte apart from timings', async () => {
    const merged = await sharded(repo, 2, folder)
    expect(deterministic(merged)).toBe(deterministic(single))
    const drops = readdirSync(join(folder, 'drops-2')).flatMap((name) => JSON.parse(readFileSync(join(folder, 'drops-2', name), 'utf8')).units.map((u: { id: string }) => u.id))
    // On the base the group is above the floor: refitted without as a whole, and stop_count (not the
    // top feature) alone. On the head the leak takes the model and the group falls to the floor.
    expect(drops.filter((id: string) => id.endsWith('/without-group/route')).sort()).toEqual([1, 2, 3].map((r) => `base/refit-${r}/without-group/route`))
    expect(drops).toContain('base/refit-1/without/stop_count')
    const route = single.features.find((f) => f.name === 'route' && f.isGroup)!
    expect(route.base?.dropColumn?.perRefit).toHaveLength(3)
    expect(route.head?.dropColumn).toBeUndefined()
  }, 120_000)

  it('reads the group units back from the cache, with the report of a fresh check', async () => {
    const cache = join(folder, 'cache')
    const first = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(first.cache?.measured).toContain('base/refit-2/without-group/route')
    const second = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(second.cache?.measured).toEqual([])
    expect(second.cache?.reused).toContain('base/refit-2/without-group/route')
    expect(deterministic(second)).toBe(deterministic(single))
  }, 120_000)
})

const skipTraining = missingReference('python3-sklearn', 'shard-merge.test.ts', 'the training-command shards') ?? missingReference('python3-onnx', 'shard-merge.test.ts', 'the training-command shards')

describe.skipIf(Boolean(skipTraining))('plumbline plan, shard and merge (a training command)', () => {
  let repo: TestRepository
  let folder: string
  let single: GateReport
  beforeAll(async () => {
    const trainer = join(projectRoot, 'sample-repo', 'python')
    const policy = smallPolicy()
      .replace(/model:\n {2}builtin:\n(?: {4}.*\n)+/, `model:\n  train:\n    command: /usr/bin/python3 python/train.py --model logistic\n    timeout_seconds: 120\n    parallel: 2\n`)
      .replace('refits: 3', 'refits: 2')
      .replace('draws: 3', 'draws: 2')
    // The trainer is committed on both sides, as a repository's own training code would be.
    const code = Object.fromEntries(['train.py', 'onnx_export.py'].map((file) => [`python/${file}`, readFileSync(join(trainer, file), 'utf8')]))
    repo = leakRepository(policy, code)
    folder = mkdtempSync(join(tmpdir(), 'plumbline-shards-command-'))
    single = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr' })
  }, 180_000)
  afterAll(() => {
    repo?.remove()
    if (folder) rmSync(folder, { recursive: true, force: true })
  })

  it.each([1, 2, 5])('merges %i shards of training-command refits into the single-machine report', async (shards) => {
    const sides = { cwd: repo.root, baseRef: 'main', headRef: 'pr' }
    const refits = join(folder, `refits-${shards}`)
    const drops = join(folder, `drops-${shards}`)
    for (let index = 1; index <= shards; index++) await runShard({ ...sides, index, of: shards, out: refits })
    for (let index = 1; index <= shards; index++) await runShard({ ...sides, index, of: shards, out: drops, after: [refits] })
    const merged = await runMerge({ ...sides, dirs: [refits, drops] })
    expect(single.sides?.head.model.kind).toBe('onnx')
    expect(readdirSync(drops).length).toBe(shards)
    expect(deterministic(merged)).toBe(deterministic(single))
  }, 180_000)
})
