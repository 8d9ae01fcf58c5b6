/**
 * Permutation-importance benchmark: 10,000 evaluation rows × 30 features × 5 draws over a boosted
 * model of 300 trees of depth 6 fitted on 50,000 rows (one thread). Reference in the same command,
 * where /usr/bin/python3 has them: scikit-learn's sklearn.inspection.permutation_importance
 * (n_repeats 5, n_jobs 1) over an XGBoost hist model (nthread 1) with the same settings, fitted on
 * the same rows. Each side is timed over the importance computation only, not the fit.
 *
 * Run: node --import tsx bench/permutation-importance.ts
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { pathToFileURL } from 'node:url'
import type { FeatureMatrix } from '../src/core/data/dataset.ts'
import { permutationImportance } from '../src/core/importance/permutation-importance.ts'
import { metricByName } from '../src/core/metrics/metric-by-name.ts'
import { binFeatures } from '../src/core/models/gbt/bin-features.ts'
import { fitBoosted } from '../src/core/models/gbt/fit-boosted.ts'
import { createRandom } from '../src/core/statistics/random.ts'

const PYTHON = '/usr/bin/python3'
const FEATURES = 30

function make(rows: number, seed: number): { matrix: FeatureMatrix; y: Float64Array } {
  const random = createRandom(seed)
  const columns = Array.from({ length: FEATURES }, () => new Float64Array(rows))
  const y = new Float64Array(rows)
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < FEATURES; j++) columns[j][i] = random.next()
    const x = (j: number) => columns[j][i]
    let value = 10 * Math.sin(Math.PI * x(0) * x(1)) + 20 * (x(2) - 0.5) ** 2 + 10 * x(3) + 5 * x(4)
    for (let j = 10; j < 20; j++) value += 0.5 * x(j)
    y[i] = value + random.normal()
  }
  const features = Array.from({ length: FEATURES }, (_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const }))
  return { matrix: { rows, features, columns }, y }
}

function toCsv(matrix: FeatureMatrix, y: Float64Array): string {
  const lines: string[] = []
  for (let i = 0; i < matrix.rows; i++) lines.push([...matrix.columns.map((c) => String(c[i])), String(y[i])].join(','))
  return `${lines.join('\n')}\n`
}

const SKLEARN_SCRIPT = `
import json, sys, time
import numpy as np
import xgboost as xgb
import sklearn
from sklearn.inspection import permutation_importance
train = np.loadtxt(sys.argv[1], delimiter=',')
evaluation = np.loadtxt(sys.argv[2], delimiter=',')
model = xgb.XGBRegressor(tree_method='hist', max_bin=255, n_jobs=1, max_depth=6, n_estimators=300,
                         learning_rate=0.1, reg_lambda=1, min_child_weight=1, base_score=float(train[:, -1].mean()))
model.fit(train[:, :-1], train[:, -1])
start, cpu = time.perf_counter(), time.process_time()
result = permutation_importance(model, evaluation[:, :-1], evaluation[:, -1], n_repeats=5, n_jobs=1,
                                random_state=0, scoring='neg_root_mean_squared_error')
seconds, cpu = time.perf_counter() - start, time.process_time() - cpu
import resource
print(json.dumps({'seconds': seconds, 'cpuSeconds': cpu, 'top': int(np.argmax(result.importances_mean)) + 1, 'sklearn': sklearn.__version__,
                  'peakRssKiB': resource.getrusage(resource.RUSAGE_SELF).ru_maxrss}))
`

export interface ImportanceBenchRow {
  readonly tool: string
  readonly seconds: number
  readonly ratio: number
  /** CPU seconds of the computation (steadier than wall time on a shared machine) and their ratio. */
  readonly cpuSeconds: number
  readonly cpuRatio: number
  readonly topFeature: string
  /** Peak resident set of the measuring process (ours: the node process; scikit-learn: its python process). */
  readonly peakRssMiB: number
}

export async function benchPermutationImportance(): Promise<ImportanceBenchRow[]> {
  const train = make(50_000, 11)
  const evaluation = make(10_000, 12)
  const binned = binFeatures(train.matrix, { maxBins: 255 })
  const model = fitBoosted(binned, train.y, {
    task: 'regression',
    seed: 1,
    settings: { trees: 300, maxDepth: 6, learningRate: 0.1, minRowsPerLeaf: 1, l2: 1, rowSubsample: 1, columnSubsample: 1 },
  })
  const data = { ...evaluation.matrix, target: { name: 'y', values: evaluation.y } }
  const start = performance.now()
  const cpuStart = process.cpuUsage()
  const result = await permutationImportance(model, data, { metric: metricByName('rmse', 'regression'), draws: 5, seed: 1 })
  const ours = (performance.now() - start) / 1000
  const cpuUsed = process.cpuUsage(cpuStart)
  const ourCpu = (cpuUsed.user + cpuUsed.system) / 1e6
  const top = [...result.importances].sort((a, b) => b.mean - a.mean)[0].name
  const rows: ImportanceBenchRow[] = [
    { tool: 'plumbline permutationImportance', seconds: ours, ratio: NaN, cpuSeconds: ourCpu, cpuRatio: NaN, topFeature: top, peakRssMiB: process.resourceUsage().maxRSS / 1024 },
  ]
  const probe = spawnSync(PYTHON, ['-c', 'import xgboost, sklearn'], { encoding: 'utf8' })
  if (probe.status === 0) {
    const dir = mkdtempSync(join(tmpdir(), 'plumbline-bench-'))
    try {
      writeFileSync(join(dir, 'train.csv'), toCsv(train.matrix, train.y))
      writeFileSync(join(dir, 'evaluation.csv'), toCsv(evaluation.matrix, evaluation.y))
      const run = spawnSync(PYTHON, ['-c', SKLEARN_SCRIPT, join(dir, 'train.csv'), join(dir, 'evaluation.csv')], {
        encoding: 'utf8',
        env: { ...process.env, OMP_NUM_THREADS: '1' },
      })
      if (run.status !== 0) throw new Error(`scikit-learn run failed:\n${run.stderr}`)
      const reference = JSON.parse(run.stdout.trim().split('\n').pop()!)
      rows[0] = { ...rows[0], ratio: ours / reference.seconds, cpuRatio: ourCpu / reference.cpuSeconds }
      rows.push({
        tool: `scikit-learn ${reference.sklearn} permutation_importance (XGBoost model)`,
        seconds: reference.seconds,
        ratio: 1,
        cpuSeconds: reference.cpuSeconds,
        cpuRatio: 1,
        topFeature: `x${reference.top}`,
        peakRssMiB: reference.peakRssKiB / 1024,
      })
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  }
  return rows
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const rows = await benchPermutationImportance()
  console.log('10,000 evaluation rows x 30 features x 5 draws, 300 trees of depth 6, one thread\n')
  console.log('| tool | seconds | ratio to reference | CPU seconds | CPU ratio | top feature | peak RSS MiB |\n|---|---:|---:|---:|---:|---|---:|')
  const ratio = (value: number) => (Number.isFinite(value) ? value.toFixed(2) : 'n/a')
  for (const r of rows) {
    console.log(
      `| ${r.tool} | ${r.seconds.toFixed(2)} | ${ratio(r.ratio)} | ${r.cpuSeconds.toFixed(2)} | ${ratio(r.cpuRatio)} | ${r.topFeature} | ${r.peakRssMiB.toFixed(0)} |`,
    )
  }
}
