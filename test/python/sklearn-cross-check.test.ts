/**
 * Cross-check against the reference library: plumbline's permutationImportance of an ONNX model and
 * scikit-learn 1.2.1's sklearn.inspection.permutation_importance (Debian python3-sklearn) of the same
 * fitted model on the same holdout rows agree within their combined standard errors, for every
 * feature.
 *
 * Data: the diabetes data bundled with python3-sklearn
 * (/usr/lib/python3/dist-packages/sklearn/datasets/data/diabetes_data_raw.csv.gz, 442 rows of 10
 * whitespace-separated raw features, and diabetes_target.csv.gz, one target per line), read here
 * and in Python from the same files. diabetes-permutation-importance.py splits the rows (fixed
 * seed), fits a GradientBoostingRegressor(random_state=0), exports it with
 * sample-repo/python/onnx_export.py and runs permutation_importance with 200 repeats. This side
 * loads that ONNX file with loadOnnxModel and runs permutationImportance on the same holdout rows
 * with 200 draws and no reference (so both are plain permutations of the holdout column).
 *
 * Why 3 standard errors: the two tools draw independent permutations, so each mean is an average of
 * 200 independent draws of the same quantity (the loss increase under a uniformly random
 * permutation of one column, for this model and these rows). Their difference then has mean 0 and,
 * by the central limit theorem, is close to normal with SD sqrt(se_a² + se_b²); |z| <= 3 holds with
 * probability 99.73% per feature and about 97% for all 10 features at once (the three-sigma rule,
 * common practice; 2 would fail one feature in two runs of 10). The RMSE comparison reuses each
 * tool's MSE permutations, so it is nearly the same test again, not 10 more chances to fail. The
 * seeds are fixed, so the outcome does not change from run to run.
 */
import { readFileSync, rmSync, mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { gunzipSync } from 'node:zlib'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadOnnxModel } from '../../src/adapters/onnx/load-onnx-model.ts'
import { selectRows, type FeatureMatrix } from '../../src/core/data/dataset.ts'
import { permutationImportance, type PermutationImportanceResult } from '../../src/core/importance/permutation-importance.ts'
import { metricByName } from '../../src/core/metrics/metric-by-name.ts'
import type { Model } from '../../src/core/models/model.ts'
import { meanSquaredError } from '../core/importance/enumerate-permutation-draws.ts'
import { pythonMissing, reportSkip, runPython } from './python-tools.ts'

reportSkip('test/python/sklearn-cross-check.test.ts')

const DATA = '/usr/lib/python3/dist-packages/sklearn/datasets/data'
const DRAWS = 200
const SEED = 31

interface SklearnSide {
  features: string[]
  rows: number
  holdout: number[]
  prediction: number[]
  mse: number
  repeats: number
  importance: Record<'neg_mean_squared_error' | 'neg_root_mean_squared_error', { mean: number[]; sd: number[]; se: number[] }>
}

function readDiabetes(features: readonly string[]): FeatureMatrix & { target: { name: string; values: Float64Array } } {
  const lines = (name: string) => gunzipSync(readFileSync(join(DATA, name))).toString('utf8').trim().split('\n')
  const rows = lines('diabetes_data_raw.csv.gz').map((line) => line.trim().split(/\s+/).map(Number))
  const target = Float64Array.from(lines('diabetes_target.csv.gz'), Number)
  return {
    rows: rows.length,
    features: features.map((name) => ({ name, kind: 'numeric' as const })),
    columns: features.map((_, j) => Float64Array.from(rows, (row) => row[j])),
    target: { name: 'progression', values: target },
  }
}

describe.skipIf(pythonMissing !== undefined)(
  'permutationImportance of the exported model vs sklearn.inspection.permutation_importance (scikit-learn 1.2.1, diabetes data)',
  () => {
    let directory = ''
    let sklearn: SklearnSide
    let model: Model
    let holdout: ReturnType<typeof readDiabetes>

    beforeAll(async () => {
      directory = mkdtempSync(join(tmpdir(), 'plumbline-cross-check-'))
      const script = join(dirname(fileURLToPath(import.meta.url)), 'diabetes-permutation-importance.py')
      await runPython([script, directory], { cwd: directory })
      sklearn = JSON.parse(readFileSync(join(directory, 'sklearn.json'), 'utf8')) as SklearnSide
      const all = readDiabetes(sklearn.features)
      holdout = selectRows(all, sklearn.holdout)
      model = await loadOnnxModel(new Uint8Array(readFileSync(join(directory, 'model.onnx'))), {
        source: 'model.onnx',
        task: 'regression',
        features: all.features,
      })
    })
    afterAll(() => {
      if (directory) rmSync(directory, { recursive: true, force: true })
    })

    it('reads the same 442 rows and scores the holdout as scikit-learn does', async () => {
      expect(sklearn.rows).toBe(442)
      expect(holdout.rows).toBe(133)
      const predicted = await model.predict(holdout)
      // float32 tree output: about 6e-8 relative on predictions of 25 to 346.
      let largest = 0
      predicted.forEach((p, i) => (largest = Math.max(largest, Math.abs(p - sklearn.prediction[i]))))
      expect(largest).toBeLessThan(1e-4)
      expect(meanSquaredError.compute(holdout.target.values, predicted) / sklearn.mse).toBeCloseTo(1, 6)
    })

    function expectAgreement(ours: PermutationImportanceResult, theirs: { mean: number[]; se: number[] }) {
      const rows = sklearn.features.map((name, j) => {
        const estimate = ours.importances.find((e) => e.name === name)!
        const se = estimate.sd / Math.sqrt(estimate.draws.length)
        return { name, ours: estimate.mean, oursSe: se, theirs: theirs.mean[j], theirsSe: theirs.se[j] }
      })
      for (const row of rows) {
        const combined = Math.sqrt(row.oursSe ** 2 + row.theirsSe ** 2)
        expect(Math.abs(row.ours - row.theirs), `${row.name}: ${row.ours} ± ${row.oursSe} vs ${row.theirs} ± ${row.theirsSe}`).toBeLessThanOrEqual(3 * combined)
      }
      return rows
    }

    it('MSE (scoring=neg_mean_squared_error): the means agree within 3 combined standard errors for every feature', async () => {
      const ours = await permutationImportance(model, holdout, { metric: meanSquaredError, draws: DRAWS, seed: SEED })
      expect(ours.importances.map((e) => e.name)).toEqual(sklearn.features)
      expect(ours.importances.every((e) => e.draws.length === DRAWS)).toBe(true)
      expect(sklearn.repeats).toBe(DRAWS)
      const rows = expectAgreement(ours, sklearn.importance.neg_mean_squared_error)
      // Not a vacuous agreement: bmi and s5 carry this model (scikit-learn's means, many SEs from 0).
      for (const name of ['bmi', 's5']) {
        const row = rows.find((r) => r.name === name)!
        expect(row.theirs / row.theirsSe).toBeGreaterThan(20)
      }
    })

    it('RMSE (plumbline’s rmse metric, scoring=neg_root_mean_squared_error): the same agreement', async () => {
      const ours = await permutationImportance(model, holdout, { metric: metricByName('rmse', 'regression'), draws: DRAWS, seed: SEED })
      expectAgreement(ours, sklearn.importance.neg_root_mean_squared_error)
    })
  },
)
