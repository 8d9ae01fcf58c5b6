/**
 * Fit-time benchmark of the built-in boosted trees against XGBoost's hist method, one thread each.
 *
 * Data: 50,000 training and 10,000 holdout rows, 30 features, seeded (createRandom): x ~ U(0, 1);
 * y = Friedman #1 on x1..x5 + 0.5 * (x11 + ... + x20) + N(0, 1); x6..x10 and x21..x30 are noise;
 * 5% of x2, x12 and x25 are missing. Settings: 300 trees, depth 6, learning rate 0.1, lambda 1,
 * 255 bins, no subsampling, min rows per leaf 1 (XGBoost min_child_weight 1; equal for squared error
 * since every hessian is 1), base score = mean target (XGBoost 1.7 defaults to 0.5, so it is set).
 * Timed for us: binFeatures + fitBoosted. Timed for XGBoost: DMatrix + xgb.train. Holdout R^2 is
 * printed for both as a check that the two did the same work.
 *
 * Training rows: the first argument (default 50,000); npm run bench runs 10,000, 50,000 and 200,000.
 * Run: node --import tsx bench/gbt-fit.ts [rows] (npm run bench runs an esbuild bundle of it instead,
 * as dist/ ships: under tsx's loader the same code ran about 30% slower on this machine).
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { pathToFileURL } from 'node:url'
import type { FeatureMatrix } from '../src/core/data/dataset.ts'
import { binFeatures } from '../src/core/models/gbt/bin-features.ts'
import { fitBoosted, type BoostingSettings } from '../src/core/models/gbt/fit-boosted.ts'
import { createRandom } from '../src/core/statistics/random.ts'

export interface BenchRow {
  readonly learner: string
  /** Wall-clock seconds of the fit. */
  readonly fitSeconds: number
  /** CPU seconds of the fit (all threads of the process), steadier than wall time on a busy machine. */
  readonly cpuSeconds: number
  /** Wall-clock fit time relative to XGBoost's (NaN when XGBoost is not available). */
  readonly ratioToXgboost: number
  /** CPU time relative to XGBoost's. */
  readonly cpuRatioToXgboost: number
  readonly holdoutR2: number
  /** Peak resident set of the measuring process (ours: the node process so far; XGBoost: its python process). */
  readonly peakRssMiB: number
}

const PYTHON = '/usr/bin/python3'
const TRAIN_ROWS = parseRows(process.argv[2])
const HOLDOUT_ROWS = 10_000
const FEATURES = 30
const SEED = 20240611
const SETTINGS: BoostingSettings = {
  trees: 300,
  maxDepth: 6,
  learningRate: 0.1,
  minRowsPerLeaf: 1,
  l2: 1,
  rowSubsample: 1,
  columnSubsample: 1,
}

function parseRows(argument: string | undefined): number {
  if (argument === undefined) return 50_000
  const rows = Number(argument)
  if (!Number.isInteger(rows) || rows < 100) throw new Error(`bench/gbt-fit.ts: rows must be a whole number >= 100, got '${argument}'`)
  return rows
}

interface Synthetic {
  readonly train: FeatureMatrix
  readonly trainY: Float64Array
  readonly holdout: FeatureMatrix
  readonly holdoutY: Float64Array
}

function generate(): Synthetic {
  const random = createRandom(SEED)
  const make = (rows: number) => {
    const columns = Array.from({ length: FEATURES }, () => new Float64Array(rows))
    const y = new Float64Array(rows)
    for (let i = 0; i < rows; i++) {
      for (let j = 0; j < FEATURES; j++) columns[j][i] = random.next()
      const x = (j: number) => columns[j][i]
      let value = 10 * Math.sin(Math.PI * x(0) * x(1)) + 20 * (x(2) - 0.5) ** 2 + 10 * x(3) + 5 * x(4)
      for (let j = 10; j < 20; j++) value += 0.5 * x(j)
      y[i] = value + random.normal()
      for (const j of [1, 11, 24]) if (random.next() < 0.05) columns[j][i] = NaN
    }
    const matrix: FeatureMatrix = {
      rows,
      features: Array.from({ length: FEATURES }, (_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const })),
      columns,
    }
    return { matrix, y }
  }
  const train = make(TRAIN_ROWS)
  const holdout = make(HOLDOUT_ROWS)
  return { train: train.matrix, trainY: train.y, holdout: holdout.matrix, holdoutY: holdout.y }
}

function r2(y: ArrayLike<number>, prediction: ArrayLike<number>): number {
  let mean = 0
  for (let i = 0; i < y.length; i++) mean += y[i]
  mean /= y.length
  let residual = 0
  let total = 0
  for (let i = 0; i < y.length; i++) {
    residual += (y[i] - prediction[i]) ** 2
    total += (y[i] - mean) ** 2
  }
  return 1 - residual / total
}

function toCsv(matrix: FeatureMatrix, y: Float64Array): string {
  const lines: string[] = []
  for (let i = 0; i < matrix.rows; i++) {
    const cells = matrix.columns.map((c) => (Number.isNaN(c[i]) ? 'nan' : String(c[i])))
    cells.push(String(y[i]))
    lines.push(cells.join(','))
  }
  return lines.join('\n') + '\n'
}

const XGBOOST_SCRIPT = `
import json, resource, sys, time
import numpy as np
import xgboost as xgb
train = np.loadtxt(sys.argv[1], delimiter=',')
holdout = np.loadtxt(sys.argv[2], delimiter=',')
s = json.loads(sys.argv[3])
X, y = train[:, :-1], train[:, -1]
params = {'tree_method': 'hist', 'max_bin': 255, 'nthread': 1, 'max_depth': s['maxDepth'],
          'eta': s['learningRate'], 'lambda': s['l2'], 'min_child_weight': s['minRowsPerLeaf'],
          'subsample': 1, 'colsample_bytree': 1, 'objective': 'reg:squarederror',
          'base_score': float(y.mean())}
start, cpu = time.perf_counter(), time.process_time()
booster = xgb.train(params, xgb.DMatrix(X, label=y, nthread=1), num_boost_round=s['trees'])
seconds, cpu = time.perf_counter() - start, time.process_time() - cpu
p = booster.predict(xgb.DMatrix(holdout[:, :-1], nthread=1))
h = holdout[:, -1]
r2 = 1 - ((h - p) ** 2).sum() / ((h - h.mean()) ** 2).sum()
print(json.dumps({'seconds': seconds, 'cpuSeconds': cpu, 'r2': float(r2), 'peakRssKiB': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                  'version': xgb.__version__}))
`

interface XgboostResult {
  readonly seconds: number
  readonly cpuSeconds: number
  readonly r2: number
  readonly peakRssKiB: number
  readonly version: string
}

function runXgboost(data: Synthetic): XgboostResult | undefined {
  const probe = spawnSync(PYTHON, ['-c', 'import xgboost'], { encoding: 'utf8' })
  if (probe.status !== 0) return undefined
  const dir = mkdtempSync(join(tmpdir(), 'plumbline-bench-'))
  try {
    const trainPath = join(dir, 'train.csv')
    const holdoutPath = join(dir, 'holdout.csv')
    writeFileSync(trainPath, toCsv(data.train, data.trainY))
    writeFileSync(holdoutPath, toCsv(data.holdout, data.holdoutY))
    const run = spawnSync(PYTHON, ['-c', XGBOOST_SCRIPT, trainPath, holdoutPath, JSON.stringify(SETTINGS)], {
      encoding: 'utf8',
      env: { ...process.env, OMP_NUM_THREADS: '1' },
    })
    if (run.status !== 0) throw new Error(`XGBoost run failed:\n${run.stderr}`)
    return JSON.parse(run.stdout.trim().split('\n').pop()!)
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/** Runs the benchmark and returns one row per learner (ours first). */
export function benchGbtFit(): BenchRow[] {
  const data = generate()
  const start = performance.now()
  const cpuStart = process.cpuUsage()
  const binned = binFeatures(data.train, { maxBins: 255 })
  const model = fitBoosted(binned, data.trainY, { task: 'regression', settings: SETTINGS, seed: SEED })
  const ourSeconds = (performance.now() - start) / 1000
  const cpu = process.cpuUsage(cpuStart)
  const ourCpuSeconds = (cpu.user + cpu.system) / 1e6
  const ourR2 = r2(data.holdoutY, model.predictRaw(data.holdout))
  const ourRss = process.resourceUsage().maxRSS / 1024
  const xgboost = runXgboost(data)
  const rows: BenchRow[] = [
    {
      learner: 'plumbline fitBoosted',
      fitSeconds: ourSeconds,
      cpuSeconds: ourCpuSeconds,
      ratioToXgboost: xgboost ? ourSeconds / xgboost.seconds : NaN,
      cpuRatioToXgboost: xgboost ? ourCpuSeconds / xgboost.cpuSeconds : NaN,
      holdoutR2: ourR2,
      peakRssMiB: ourRss,
    },
  ]
  if (xgboost) {
    rows.push({
      learner: `XGBoost ${xgboost.version} hist`,
      fitSeconds: xgboost.seconds,
      cpuSeconds: xgboost.cpuSeconds,
      ratioToXgboost: 1,
      cpuRatioToXgboost: 1,
      holdoutR2: xgboost.r2,
      peakRssMiB: xgboost.peakRssKiB / 1024,
    })
  }
  return rows
}

function renderTable(rows: readonly BenchRow[]): string {
  const lines = [
    `GBDT fit, ${TRAIN_ROWS} x ${FEATURES}, ${SETTINGS.trees} trees, depth ${SETTINGS.maxDepth}, 255 bins, one thread`,
    '',
    '| learner | fit seconds | ratio to XGBoost | CPU seconds | CPU ratio | CPU µs per row | holdout R² | peak RSS MiB |',
    '|---|---:|---:|---:|---:|---:|---:|---:|',
  ]
  const ratio = (value: number) => (Number.isNaN(value) ? 'n/a' : value.toFixed(2))
  for (const row of rows) {
    lines.push(
      `| ${row.learner} | ${row.fitSeconds.toFixed(2)} | ${ratio(row.ratioToXgboost)} | ${row.cpuSeconds.toFixed(2)} | ` +
        `${ratio(row.cpuRatioToXgboost)} | ${((row.cpuSeconds / TRAIN_ROWS) * 1e6).toFixed(1)} | ${row.holdoutR2.toFixed(4)} | ${row.peakRssMiB.toFixed(0)} |`,
    )
  }
  if (rows.length === 1) lines.push('', `XGBoost is not importable by ${PYTHON}: no comparison (apt-get install python3-xgboost).`)
  return lines.join('\n')
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  console.log(renderTable(benchGbtFit()))
}
