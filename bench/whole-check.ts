/**
 * Whole-check benchmark: one `plumbline check` of a benign pull request on a 50,000-row training
 * table with 30 features (binary target), default policy (reseeded refits, drop-column refits of the
 * added feature and the top feature on both sides, permutation importance, one-feature models), run
 * as users run it: the committed CLI bundle dist/cli/index.js as a child process, the refit pool
 * sized to the cores. Reference in the same command: one XGBoost hist fit of the same training table
 * (300 trees, depth 6, 255 bins, one thread, binary:logistic), as the issue that set the target
 * states it (the check within 20 such fits, peak RSS within 1 GiB).
 *
 * Data (seeded, createRandom): x1..x30 ~ U(0, 1), 5% of x2, x12 and x25 missing; the label is
 * Bernoulli(sigmoid(f / 4)) with f = Friedman #1 on x1..x5 minus its mean (about 14.4) plus
 * 0.5 * (x11 + ... + x20 - 5); 10,000 holdout rows drawn the same way. The pull request adds `x31`,
 * uniform noise unrelated to the label (a benign change that still buys drop-column refits).
 *
 * Wall time and peak RSS of the check come from /usr/bin/time (GNU time's %e and %M: the check's
 * process, with the pool's worker threads, which share it; git's short-lived children are not
 * counted). Rows: the first argument (default 50,000).
 *
 * Run: npm run build && node --import tsx bench/whole-check.ts [rows] (npm run bench rebuilds dist/
 * first, so the bundle measured is the source's).
 */
import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { createRandom } from '../src/core/statistics/random.ts'

const PYTHON = '/usr/bin/python3'
const FEATURES = 30
const HOLDOUT_ROWS = 10_000
const SEED = 20261202
// npm run bench runs this file as a bundle in a temporary folder, so it says where the project is.
const projectRoot = process.env.PLUMBLINE_BENCH_ROOT ?? resolve(dirname(fileURLToPath(import.meta.url)), '..')

function parseRows(argument: string | undefined): number {
  if (argument === undefined) return 50_000
  const rows = Number(argument)
  if (!Number.isInteger(rows) || rows < 1000) throw new Error(`bench/whole-check.ts: rows must be a whole number >= 1000, got '${argument}'`)
  return rows
}

/** CSV text of `rows` rows: x1..x30 (and x31 when `withAdded`), then `late`. */
function table(rows: number, seed: number, withAdded: boolean): string {
  const random = createRandom(seed)
  const header = Array.from({ length: FEATURES }, (_, j) => `x${j + 1}`)
  if (withAdded) header.push(`x${FEATURES + 1}`)
  header.push('late')
  const lines = [header.join(',')]
  const x = new Float64Array(FEATURES)
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < FEATURES; j++) x[j] = random.next()
    let f = 10 * Math.sin(Math.PI * x[0] * x[1]) + 20 * (x[2] - 0.5) ** 2 + 10 * x[3] + 5 * x[4] - 14.4
    for (let j = 10; j < 20; j++) f += 0.5 * (x[j] - 0.5)
    const label = random.next() < 1 / (1 + Math.exp(-f / 4)) ? 1 : 0
    // The added column's draw comes after the label's, so base and head share every other value.
    const added = random.next()
    const cells = Array.from(x, (value, j) => (j === 1 || j === 11 || j === 24) && (i * 7919 + j) % 20 === 0 ? '' : value.toFixed(6))
    if (withAdded) cells.push(added.toFixed(6))
    cells.push(String(label))
    lines.push(cells.join(','))
  }
  return lines.join('\n') + '\n'
}

const POLICY = `# Whole-check benchmark: default policy apart from the data and the target
version: 1
task: binary
target: late
seed: 7
data:
  train: data/train.csv
  holdout: data/holdout.csv
model:
  builtin:
    learner: gradient-boosting
`

function git(cwd: string, ...args: string[]): void {
  execFileSync('git', args, { cwd, stdio: 'pipe' })
}

function writeRepository(dir: string, rows: number): string {
  const repo = join(dir, 'repo')
  mkdirSync(join(repo, 'data'), { recursive: true })
  git(repo, 'init', '--quiet', '--initial-branch=main')
  git(repo, 'config', 'user.email', 'bench@northwind-parcel.example')
  git(repo, 'config', 'user.name', 'Northwind Parcel bench')
  git(repo, 'config', 'commit.gpgsign', 'false')
  writeFileSync(join(repo, 'plumbline.yml'), POLICY)
  writeFileSync(join(repo, 'data', 'train.csv'), table(rows, SEED, false))
  writeFileSync(join(repo, 'data', 'holdout.csv'), table(HOLDOUT_ROWS, SEED + 1, false))
  git(repo, 'add', '-A')
  git(repo, 'commit', '--quiet', '-m', 'Base')
  git(repo, 'checkout', '--quiet', '-b', 'pr')
  writeFileSync(join(repo, 'data', 'train.csv'), table(rows, SEED, true))
  writeFileSync(join(repo, 'data', 'holdout.csv'), table(HOLDOUT_ROWS, SEED + 1, true))
  git(repo, 'add', '-A')
  git(repo, 'commit', '--quiet', '-m', 'Pull request: adds x31')
  return repo
}

interface CheckRun {
  readonly seconds: number
  readonly peakRssMiB: number
  readonly exitCode: number
  readonly verdict: string
  readonly headline: string
  readonly refits: number
  readonly dropColumnRefits: number
}

function runCheck(repo: string): CheckRun {
  const cli = join(projectRoot, 'dist', 'cli', 'index.js')
  if (!existsSync(cli)) throw new Error(`bench/whole-check.ts: ${cli} is missing; run npm run build first`)
  const reportPath = join(repo, '..', 'report.json')
  const run = spawnSync('/usr/bin/time', ['-f', 'PLUMBLINE-TIME %e %M', process.execPath, cli, 'check', '--base', 'main', '--head', 'pr', '--json', reportPath, '--quiet'], {
    cwd: repo,
    encoding: 'utf8',
    env: { PATH: process.env.PATH ?? '/usr/bin:/bin', HOME: process.env.HOME ?? tmpdir() },
  })
  const timing = /PLUMBLINE-TIME ([\d.]+) (\d+)/.exec(run.stderr)
  if (!timing || !existsSync(reportPath)) throw new Error(`plumbline check failed (exit ${run.status}):\n${run.stderr.slice(-2000)}`)
  const report = JSON.parse(readFileSync(reportPath, 'utf8'))
  const sides = [report.sides?.base, report.sides?.head]
  const refits = sides.reduce((sum: number, side: { scores?: unknown[] } | undefined) => sum + (side?.scores?.length ?? 0), 0)
  let dropColumnRefits = 0
  for (const row of report.features ?? []) {
    for (const side of [row.base, row.head]) dropColumnRefits += side?.dropColumn?.perRefit?.length ?? 0
  }
  return {
    seconds: Number(timing[1]),
    peakRssMiB: Number(timing[2]) / 1024,
    exitCode: run.status ?? -1,
    verdict: String(report.verdict),
    headline: String(report.headline),
    refits,
    dropColumnRefits,
  }
}

const XGBOOST_SCRIPT = `
import json, resource, sys, time
import numpy as np
import xgboost as xgb
train = np.genfromtxt(sys.argv[1], delimiter=',', skip_header=1, missing_values='', filling_values=np.nan)
X, y = train[:, :-1], train[:, -1]
params = {'tree_method': 'hist', 'max_bin': 255, 'nthread': 1, 'max_depth': 6, 'eta': 0.1, 'lambda': 1,
          'min_child_weight': 1, 'subsample': 1, 'colsample_bytree': 1, 'objective': 'binary:logistic'}
start, cpu = time.perf_counter(), time.process_time()
booster = xgb.train(params, xgb.DMatrix(X, label=y, nthread=1), num_boost_round=300)
seconds, cpu = time.perf_counter() - start, time.process_time() - cpu
print(json.dumps({'seconds': seconds, 'cpuSeconds': cpu, 'peakRssKiB': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                  'version': xgb.__version__}))
`

function runXgboost(repo: string): { seconds: number; version: string } | undefined {
  if (spawnSync(PYTHON, ['-c', 'import xgboost'], { encoding: 'utf8' }).status !== 0) return undefined
  git(repo, 'checkout', '--quiet', 'main')
  const run = spawnSync(PYTHON, ['-c', XGBOOST_SCRIPT, join(repo, 'data', 'train.csv')], {
    encoding: 'utf8',
    env: { ...process.env, OMP_NUM_THREADS: '1' },
  })
  if (run.status !== 0) throw new Error(`XGBoost run failed:\n${run.stderr}`)
  return JSON.parse(run.stdout.trim().split('\n').pop()!)
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const rows = parseRows(process.argv[2])
  const dir = mkdtempSync(join(tmpdir(), 'plumbline-bench-check-'))
  try {
    const repo = writeRepository(dir, rows)
    const check = runCheck(repo)
    const xgboost = runXgboost(repo)
    const ratio = xgboost ? (check.seconds / xgboost.seconds).toFixed(1) : 'n/a'
    console.log(
      [
        `Whole check, ${rows} training + ${HOLDOUT_ROWS} holdout rows x ${FEATURES} features (binary), benign pull request adding one noise column, default policy`,
        '',
        '| run | seconds | ratio to one XGBoost fit | peak RSS MiB | verdict (exit) | refits | drop-column refits |',
        '|---|---:|---:|---:|---|---:|---:|',
        `| plumbline check (dist/cli, pool sized to the cores) | ${check.seconds.toFixed(1)} | ${ratio} | ${check.peakRssMiB.toFixed(0)} | ${check.verdict} (${check.exitCode}) | ${check.refits} | ${check.dropColumnRefits} |`,
        xgboost
          ? `| XGBoost ${xgboost.version} hist, one fit of the training table, one thread | ${xgboost.seconds.toFixed(1)} | 1.0 | | | 1 | |`
          : `XGBoost is not importable by ${PYTHON}: no comparison (apt-get install python3-xgboost).`,
        '',
        `The check's headline: ${check.headline}`,
      ].join('\n'),
    )
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}
