/**
 * plumbline check and init end to end: the CLI's main() with captured output (the bin only adds
 * process.argv and process.exitCode) on small generated git repositories (test/helpers/make-repository.ts:
 * 1200 training and 300 holdout parcels, 60 trees, 3 refits, 3 draws; about 2 s per check).
 *
 * The CLI measures the two sides in two worker threads when it can (src/adapters/parallel/); each
 * worker starts its own TypeScript loader, which costs more than these small checks themselves. So
 * the runs here set PLUMBLINE_THREADS=1 (measure in process), except the first run of the no-op
 * pull request, which takes the default path and must give the same report as the in-process rerun.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { main } from '../../../src/adapters/cli/main.ts'
import { usage } from '../../../src/adapters/cli/args.ts'
import { parseGateReport } from '../../../src/core/report/report-schema.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import {
  baseFiles,
  dispatchColumns,
  makeParcels,
  makeRepository,
  parcelsCsv,
  smallPolicy,
  standardParcels,
  type TestRepository,
} from '../../helpers/make-repository.ts'

interface Run {
  readonly code: number
  readonly stdout: string
  readonly stderr: string
}

async function run(argv: string[], cwd: string, threads: 'in process' | 'default' = 'in process'): Promise<Run> {
  let stdout = ''
  let stderr = ''
  const saved = process.env.PLUMBLINE_THREADS
  if (threads === 'in process') process.env.PLUMBLINE_THREADS = '1'
  else delete process.env.PLUMBLINE_THREADS
  try {
    const code = await main(argv, { cwd, stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), isTty: false })
    return { code, stdout, stderr }
  } finally {
    if (saved === undefined) delete process.env.PLUMBLINE_THREADS
    else process.env.PLUMBLINE_THREADS = saved
  }
}

/** The JSON report a run wrote, read back through the report's own schema (docs/report-json.md). */
function readReport(repo: TestRepository, file: string): GateReport {
  const path = join(repo.root, file)
  return parseGateReport(JSON.parse(readFileSync(path, 'utf8')), path)
}

function worktrees(repo: TestRepository): string[] {
  return repo
    .git('worktree', 'list', '--porcelain')
    .split('\n')
    .filter((line) => line.startsWith('worktree '))
}

const repositories: TestRepository[] = []
function repository(options: Parameters<typeof makeRepository>[0]): TestRepository {
  const repo = makeRepository(options)
  repositories.push(repo)
  return repo
}
afterAll(() => {
  for (const repo of repositories) repo.remove()
})

const { train, holdout } = standardParcels()
const withColumns = (columns: readonly (keyof (typeof train)[number])[]) => ({
  'data/train.csv': parcelsCsv(train, columns),
  'data/holdout.csv': parcelsCsv(holdout, columns),
})

describe('plumbline check on a pull request that changes nothing the model sees', () => {
  let repo: TestRepository
  let first: Run
  beforeAll(async () => {
    repo = repository({ base: baseFiles() })
    first = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'out/report.json', '--markdown', 'out/comment.md'], repo.root, 'default')
  })

  it('passes with exit 0 and says so in its first lines', () => {
    expect(first.code).toBe(0)
    const report = readReport(repo, 'out/report.json')
    expect(report.verdict).toBe('pass')
    expect(report.findings.filter((f) => f.severity !== 'info')).toEqual([])
    expect(report.headline).toBe('Passed: no leakage-like dominance, rank shift or score regression beyond reseed noise was found.')
    expect(first.stdout.startsWith('plumbline: pass\n\nPassed: no leakage-like dominance, rank shift or score regression beyond reseed noise was found.\n')).toBe(true)
    expect(first.stderr).toMatch(/\nplumbline: pass in \d+\.\d s\n$/)
  })

  it('writes a JSON report that its schema accepts, naming both commits and every refit seed', () => {
    const report = readReport(repo, 'out/report.json')
    expect(report.schemaVersion).toBe(1)
    expect(report.sides!.base).toMatchObject({ ref: 'main', commit: repo.baseCommit, trainRows: 1200, holdoutRows: 300 })
    expect(report.sides!.head).toMatchObject({ ref: 'pr', commit: repo.headCommit })
    expect(report.sides!.base.refitSeeds).toHaveLength(3)
    expect(report.sides!.head.refitSeeds).toEqual(report.sides!.base.refitSeeds)
    expect(report.settings).toMatchObject({ task: 'binary', target: 'late', metric: 'log-loss', draws: 3, refits: 3, seed: 7, policyFrom: 'head' })
    expect(report.features.map((f) => f.name).sort()).toEqual([...dispatchColumns.slice(1)].sort())
    expect(readFileSync(join(repo.root, 'out/comment.md'), 'utf8').startsWith('<!-- plumbline -->')).toBe(true)
  })

  it('gives the same JSON report, timings aside, for the same commits and policy (worker threads or not)', async () => {
    const second = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'out/again.json'], repo.root)
    expect(second.code).toBe(0)
    const strip = (file: string) => {
      const { timings: _timings, ...rest } = JSON.parse(readFileSync(join(repo.root, file), 'utf8'))
      return rest
    }
    expect(strip('out/again.json')).toEqual(strip('out/report.json'))
  })

  it('removes the worktrees it checked out for the base and the head', () => {
    expect(worktrees(repo)).toEqual([`worktree ${repo.root}`])
  })
})

describe('plumbline check on pull requests the gate must see', () => {
  it('blocks a label leak with exit 1, comparing the working tree with the merge base by default', async () => {
    const repo = repository({ base: baseFiles(), head: withColumns([...dispatchColumns, 'scan_delay_h']) })
    const result = await run(['check', '--json', 'report.json', '--markdown', 'comment.md'], repo.root)
    expect(result.code).toBe(1)
    const report = readReport(repo, 'report.json')
    expect(report.verdict).toBe('block')
    expect(report.headline).toBe('Blocked: scan_delay_h, new here, alone separates the holdout (AUC 1).')
    // A one-feature pull request: what a reviewer sees before the first collapsed section fits one screen.
    const comment = readFileSync(join(repo.root, 'comment.md'), 'utf8')
    const visible = comment.split('\n<details>')[0].split('\n')
    expect(visible.length).toBeLessThanOrEqual(45)
    expect(visible[4]).toBe('Blocked: scan\\_delay\\_h, new here, alone separates the holdout (AUC 1).')
    expect(visible[6]).toMatch(/^Holdout log-loss \(lower is better\): base [\d.]+ \\\[[\d.]+, [\d.]+\\\] → head /)
    expect(visible).toContain('```mermaid')
    expect(report.findings[0]).toMatchObject({ kind: 'leakage', severity: 'block', feature: 'scan_delay_h' })
    expect(report.featureSet).toEqual({ added: ['scan_delay_h'], removed: [], kindChanged: [] })
    expect(report.sides!.base).toMatchObject({ ref: 'merge-base(HEAD, main)', commit: repo.baseCommit })
    expect(report.sides!.head).toMatchObject({ ref: 'working tree', commit: null })
    expect(result.stderr).toContain(`Base: merge-base(HEAD, main) (${repo.baseCommit.slice(0, 12)}); head: working tree\n`)
    expect(worktrees(repo)).toHaveLength(1)
  })

  it('passes a reseed-only change with exit 0: the policy change is the only warning', async () => {
    const repo = repository({ base: baseFiles(), head: { 'plumbline.yml': smallPolicy({ seed: 8 }) } })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'report.json'], repo.root)
    expect(result.code).toBe(0)
    const report = readReport(repo, 'report.json')
    expect(report.verdict).toBe('warn')
    expect(report.findings.filter((f) => f.severity !== 'info')).toEqual([
      {
        kind: 'policy-changed',
        severity: 'warn',
        title: 'This pull request changes the policy file plumbline.yml.',
        message:
          "The head's policy governs both sides of this comparison. Review the policy change itself: a loosened threshold or a check turned off changes what this gate can see.",
        evidence: { policySource: 'plumbline.yml' },
      },
    ])
    expect(report.settings.seed).toBe(8)
  })

  it('reports a removed strong feature: a feature-set finding and the removed feature’s row', async () => {
    const repo = repository({ base: baseFiles(), head: withColumns(dispatchColumns.filter((c) => c !== 'distance_km')) })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'report.json'], repo.root)
    const report = readReport(repo, 'report.json')
    expect(report.findings.find((f) => f.kind === 'feature-set')).toEqual({
      kind: 'feature-set',
      severity: 'info',
      title: 'This pull request removed distance_km.',
      message: 'Features are compared by column name. 0 added, 1 removed, 0 changed kind.',
      evidence: { added: 0, removed: 1, kindChanged: 0 },
    })
    const row = report.features.find((f) => f.name === 'distance_km')!
    expect(row.presence).toBe('removed')
    expect(row.base!.rank).toBe(1)
    expect(row.head).toBeUndefined()
    // Without its strongest feature the model's holdout log loss is worse beyond reseed noise.
    expect(report.findings[0]).toMatchObject({ kind: 'score-regression', severity: 'block' })
    expect(result.code).toBe(1)
  })

  it('runs with refits: 1 and draws: 1, where no rank test is possible, and passes a no-op change', async () => {
    // This ended as an internal error (exit 3) before checkRankShift skipped untestable units.
    const policy = smallPolicy().replace('draws: 3\n  refits: 3', 'draws: 1\n  refits: 1')
    const repo = repository({ base: baseFiles({ policy }) })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'report.json'], repo.root)
    expect(result.code).toBe(0)
    const report = readReport(repo, 'report.json')
    expect(report.verdict).toBe('pass')
    expect(report.features[0].shift).toMatchObject({ welchT: NaN, pValue: NaN, isSignificant: false })
  })

  it('blocks when the pull request changes the holdout rows (exit 1)', async () => {
    const replaced = [...holdout.slice(0, 280), ...makeParcels(20, 99, 900000)]
    const repo = repository({ base: baseFiles(), head: { 'data/holdout.csv': parcelsCsv(replaced) } })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'report.json'], repo.root)
    expect(result.code).toBe(1)
    const report = readReport(repo, 'report.json')
    const title = 'The two sides are not scored on the same holdout rows: 20 of 300 ids differ by position (20 ids only on the head).'
    expect(report.findings[0]).toMatchObject({ kind: 'holdout-rows', severity: 'block', title })
    expect(report.findings[0].message).toBe(
      "Holdout row 281 has parcel_id 'P101480' on the base side and 'P900000' on the head; 20 of 300 rows differ by position and 20 head ids do not occur on the base side. " +
        'Score and importance differences between the sides would then mix the change with a different sample. ' +
        'Keep the holdout fixed in the pull request (or split by an id column with data.split.by), then rerun.',
    )
    expect(report.headline.startsWith(`Blocked: the two sides are not scored on the same holdout rows: 20 of 300 ids`)).toBe(true)
  })
})

describe('plumbline check on problems the user can fix', () => {
  it('refuses a bad policy with exit 2 and a message naming file, line, key, value and fix', async () => {
    const repo = repository({ base: baseFiles(), head: { 'plumbline.yml': smallPolicy({ extra: 'checks:\n  leakage:\n    action: blok\n' }) } })
    const result = await run(['check', '--base', 'main'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr).toBe(
      "plumbline.yml:21:13: checks.leakage.action must be one of block, warn, off; got 'blok'.\n" +
        'Set checks.leakage.action to one of block, warn, off, or delete the line to use the default (block).\n',
    )
    expect(result.stdout).toBe('')
  })

  it('refuses a --base that names no commit with exit 2', async () => {
    const repo = repository({ base: baseFiles() })
    const result = await run(['check', '--base', 'no-such-branch'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr.endsWith(
      `--base 'no-such-branch' does not name a commit in ${repo.root}.\n` +
        'Check the spelling, or fetch it first (git fetch origin no-such-branch); a shallow clone may lack it.\n',
    )).toBe(true)
  })

  it('removes the base worktree after a run that fails inside it, and writes an error report', async () => {
    const policy = smallPolicy().replace('data:\n', 'prepare:\n  command: echo building features; exit 3\ndata:\n')
    const repo = repository({ base: baseFiles({ policy }), head: { 'plumbline.yml': policy } })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--json', 'report.json'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr).toContain(
      'prepare on the base side exited with code 3: echo building features; exit 3\n--- last lines of its output ---\nbuilding features\n' +
        'Run the command yourself in the base checkout to see the problem.\n',
    )
    expect(worktrees(repo)).toEqual([`worktree ${repo.root}`])
    const report = readReport(repo, 'report.json')
    expect(report.verdict).toBe('error')
  })
})

describe('plumbline check, what it says', () => {
  it('prints only the verdict line with --quiet, and writes the HTML report', async () => {
    const repo = repository({ base: baseFiles() })
    const result = await run(['check', '--base', 'main', '--head', 'pr', '--quiet', '--html', 'out/report.html'], repo.root)
    expect(result).toEqual({
      code: 0,
      stdout: 'plumbline: Passed: no leakage-like dominance, rank shift or score regression beyond reseed noise was found.\n',
      stderr: '',
    })
    const html = readFileSync(join(repo.root, 'out/report.html'), 'utf8')
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true)
    expect(html).toContain('<span class="verdict v-pass">PASS</span>')
  })

  it('names the side and the path in the repository for a missing data file, and shows no caution without a verdict', async () => {
    const policy = smallPolicy().replace('train: data/train.csv', 'train: data/parcels.csv')
    const repo = repository({ base: baseFiles({ policy }), head: { 'plumbline.yml': policy } })
    const result = await run(['check', '--base', 'main', '--head', 'pr'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr).toContain(
      "Cannot read the data file base: data/parcels.csv (data.train in the policy): there is no such file in that side's commit.\n" +
        "Check the path in the policy (relative to the repository root), and that the file is committed on that side, or made by 'prepare'.\n",
    )
    expect(result.stderr).not.toMatch(/plumbline-[A-Za-z0-9]{6}|\/tmp\//)
    expect(result.stdout + result.stderr).not.toContain('A pass is not proof')
  })

  it('suggests the closest file beside a misspelt data path', async () => {
    const policy = smallPolicy().replace('train: data/train.csv', 'train: data/trian.csv')
    const repo = repository({ base: baseFiles({ policy }), head: { 'plumbline.yml': policy } })
    const result = await run(['check', '--base', 'main', '--head', 'pr'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr).toContain(
      "Cannot read the data file base: data/trian.csv (data.train in the policy): there is no such file in that side's commit.\n" +
        "Did you mean 'data/train.csv'? Set data.train to the file's path relative to the repository root.\n",
    )
  })

  it('lists the closest column names when the target is misspelt', async () => {
    const policy = smallPolicy().replace('target: late', 'target: lates')
    const repo = repository({ base: baseFiles({ policy }), head: { 'plumbline.yml': policy } })
    const result = await run(['check', '--base', 'main', '--head', 'pr'], repo.root)
    expect(result.code).toBe(2)
    expect(result.stderr).toMatch(/\nbase: data\/train\.csv has no target column 'lates'\. The closest of its \d+ columns: 'late', /)
  })

  it('suggests the closest option for an unknown one', async () => {
    expect(await run(['check', '--jsn', 'out.json'], '/')).toEqual({
      code: 2,
      stdout: '',
      stderr: "plumbline check: unknown option '--jsn'. Did you mean '--json'?\nRun 'plumbline check --help' for the options.\n",
    })
    expect((await run(['check', '--html'], '/')).stderr).toBe("plumbline check: --html needs a value.\nRun 'plumbline check --help' for the options.\n")
  })
})

describe('plumbline init', () => {
  it('writes a starter policy from the training table that plumbline check then accepts', async () => {
    const { 'plumbline.yml': _policy, ...data } = baseFiles()
    const repo = repository({ base: data, checkout: 'main' })
    const init = await run(['init'], repo.root)
    expect(init).toEqual({ code: 0, stdout: "Wrote plumbline.yml (target: late). Review it, then run 'plumbline check'.\n", stderr: '' })
    expect((await run(['init'], repo.root)).stderr).toBe('plumbline.yml already exists.\nPass --force to overwrite it, or --output FILE to write elsewhere.\n')
    // The head is the working tree with the new, uncommitted policy; the base is main.
    const check = await run(['check', '--base', 'main', '--json', 'report.json'], repo.root)
    expect([0, 1]).toContain(check.code)
    const report = readReport(repo, 'report.json')
    expect(['pass', 'warn', 'block']).toContain(report.verdict)
    expect(report.settings).toMatchObject({ target: 'late', task: 'binary', policySource: 'plumbline.yml' })
    expect(report.findings.map((f) => f.kind)).toContain('policy-changed')
  })
})

describe('plumbline --help', () => {
  it('prints each command’s help and exits 0', async () => {
    for (const [argv, text] of [
      [['--help'], usage.top],
      [['check', '--help'], usage.check],
      [['init', '-h'], usage.init],
      [['plan', '--help'], usage.plan],
      [['shard', '-h'], usage.shard],
      [['merge', '--help'], usage.merge],
    ] as const) {
      expect(await run([...argv], '/')).toEqual({ code: 0, stdout: `${text}\n`, stderr: '' })
    }
    expect(usage.check).toContain('Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix, 3 an internal error.')
    expect(usage.top.split('\n')[0]).toBe('plumbline: a pull-request gate for model features.')
  })

  it('refuses a shard without its numbers, and a merge without folders, naming what is missing', async () => {
    expect(await run(['shard', '--of', '3', '--index', '4', '--out', 'x'], '/')).toEqual({
      code: 2,
      stdout: '',
      stderr: "--index must be a whole number from 1 to 3, got '4'.\nRun 'plumbline shard --help' for the options.\n",
    })
    expect(await run(['plan'], '/')).toEqual({ code: 2, stdout: '', stderr: "plumbline plan needs --shards N.\nRun 'plumbline plan --help' for the options.\n" })
    expect(await run(['merge', '--quiet'], '/')).toEqual({
      code: 2,
      stdout: '',
      stderr: 'plumbline merge needs the folders plumbline shard wrote, got none.\nRun plumbline merge DIR... with every shard’s --out folder (both stages).\n',
    })
    expect((await run(['merge', '--cache', 'c', 'dir'], '/')).stderr).toBe("plumbline merge: unknown option '--cache'. Did you mean '--base'?\nRun 'plumbline merge --help' for the options.\n")
  })

  it('refuses an unknown command with exit 2, in these words', async () => {
    expect(await run(['chekc'], '/')).toEqual({
      code: 2,
      stdout: '',
      stderr: "Unknown command 'chekc'.\nRun 'plumbline --help' for the commands (check, plan, shard, merge, init).\n",
    })
  })
})
