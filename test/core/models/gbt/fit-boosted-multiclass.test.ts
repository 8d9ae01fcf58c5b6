/**
 * Softmax boosting (fitBoosted with task multiclass): a worked first round by hand, determinism, and
 * the holdout log-loss against XGBoost 1.7.4's multi:softprob (Debian python3-xgboost) on the digits
 * table that scikit-learn ships (Debian python3-sklearn 1.2.1,
 * /usr/lib/python3/dist-packages/sklearn/datasets/data/digits.csv.gz: 1797 rows of 64 pixel
 * counts 0..16 and the digit 0..9).
 */
import { existsSync, readFileSync } from 'node:fs'
import { gunzipSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { selectRows } from '../../../../src/core/data/dataset.ts'
import { multiclassAccuracy } from '../../../../src/core/metrics/multiclass-accuracy.ts'
import { multiclassLogLoss } from '../../../../src/core/metrics/multiclass-log-loss.ts'
import { binFeatures } from '../../../../src/core/models/gbt/bin-features.ts'
import { fitBoosted, type BoostingSettings } from '../../../../src/core/models/gbt/fit-boosted.ts'

const digitsFile = '/usr/lib/python3/dist-packages/sklearn/datasets/data/digits.csv.gz'

function settings(overrides: Partial<BoostingSettings>): BoostingSettings {
  return { trees: 1, maxDepth: 0, learningRate: 1, minRowsPerLeaf: 1, l2: 0, rowSubsample: 1, columnSubsample: 1, ...overrides }
}

function matrixOf(column: number[]): FeatureMatrix {
  return { rows: column.length, features: [{ name: 'x', kind: 'numeric' }], columns: [Float64Array.from(column)] }
}

describe('fitBoosted, task multiclass', () => {
  it('grows K trees per round, each a Newton step on the softmax loss of its class (worked by hand)', () => {
    // 6 rows, classes 0, 0, 0, 1, 1, 2. Round one starts at p = 1/3 for every class, so for class k
    // G = n/3 - n_k and H = n · 2 · (1/3)(2/3) = 4n/9 (XGBoost's hessian 2p(1 - p)); a depth-0 tree
    // with l2 = 0 is one leaf of value -G/H = 9 (n_k/n - 1/3) / 4: 3/8, 0 and -3/8.
    const y = Float64Array.from([0, 0, 0, 1, 1, 2])
    const model = fitBoosted(binFeatures(matrixOf([1, 2, 3, 4, 5, 6])), y, { task: 'multiclass', classCount: 3, settings: settings({}), seed: 1 })
    expect(model.ensemble.trees.length).toBe(3)
    expect(model.classCount).toBe(3)
    const leaves = model.ensemble.trees.map((tree) => tree.value[0])
    expect(leaves[0]).toBeCloseTo(3 / 8, 14)
    expect(leaves[1]).toBeCloseTo(0, 14)
    expect(leaves[2]).toBeCloseTo(-3 / 8, 14)
    // Predictions are row-major [N, 3]: softmax of (3/8, 0, -3/8) on every row.
    const p = model.predictRaw(matrixOf([1, 6]))
    const z = Math.exp(3 / 8) + 1 + Math.exp(-3 / 8)
    expect(p.length).toBe(6)
    expect(p[0]).toBeCloseTo(Math.exp(3 / 8) / z, 14)
    expect(p[4]).toBeCloseTo(1 / z, 14)
    expect(p[5]).toBeCloseTo(Math.exp(-3 / 8) / z, 14)
  })

  it('refuses a class index at or above classCount, and a missing classCount', () => {
    const binned = binFeatures(matrixOf([1, 2, 3]))
    expect(() => fitBoosted(binned, Float64Array.from([0, 1, 3]), { task: 'multiclass', classCount: 3, settings: settings({}), seed: 1 })).toThrow(
      'fitBoosted: a target is class 3, but options.classCount is 3',
    )
    expect(() => fitBoosted(binned, Float64Array.from([0, 1, 2]), { task: 'multiclass', settings: settings({}), seed: 1 })).toThrow(
      'fitBoosted needs options.classCount >= 3 for a multiclass task, got undefined',
    )
  })

  describe.skipIf(!existsSync(digitsFile))("on scikit-learn's digits table (needs Debian's python3-sklearn)", () => {
    it('comes within 0.005 holdout log-loss of XGBoost 1.7.4 multi:softprob with the same settings', () => {
      const values = gunzipSync(readFileSync(digitsFile)).toString('utf8').trim().split('\n').map((l) => l.split(',').map(Number))
      const all: FeatureMatrix & { target: { name: string; values: Float64Array } } = {
        rows: values.length,
        features: Array.from({ length: 64 }, (_, j) => ({ name: `px${j}`, kind: 'numeric' as const })),
        columns: Array.from({ length: 64 }, (_, j) => Float64Array.from(values, (row) => row[j])),
        target: { name: 'digit', values: Float64Array.from(values, (row) => row[64]) },
      }
      const index = Array.from({ length: all.rows }, (_, i) => i)
      const train = selectRows(all, index.filter((i) => i % 4 !== 0))
      const holdout = selectRows(all, index.filter((i) => i % 4 === 0))
      const model = fitBoosted(binFeatures(train, { maxBins: 255 }), train.target.values, {
        task: 'multiclass',
        classCount: 10,
        settings: settings({ trees: 30, maxDepth: 3, learningRate: 0.3, l2: 1 }),
        seed: 1,
      })
      const p = model.predictRaw(holdout)
      // Reference, computed with XGBoost 1.7.4 and scikit-learn 1.2.1 (/usr/bin/python3) on the same
      // split (every fourth row held out): xgb.train({objective: 'multi:softprob', num_class: 10,
      // tree_method: 'hist', max_bin: 256, max_depth: 3, eta: 0.3, lambda: 1, min_child_weight: 1,
      // subsample: 1, colsample_bytree: 1}, 30 rounds) -> log_loss(y, P, eps=1e-15) =
      // 0.12397482300462312, accuracy 0.9666666666666667. Pixel counts take at most 17 values, so both
      // tools split between the same values; the tolerance covers XGBoost's float32 arithmetic
      // and its thresholds (measured here: 0.12335, 0.0006 below XGBoost).
      expect(Math.abs(multiclassLogLoss(holdout.target.values, p) - 0.12397482300462312)).toBeLessThan(0.005)
      expect(Math.abs(multiclassAccuracy(holdout.target.values, p) - 0.9666666666666667)).toBeLessThan(0.015)
    })
  })
})
