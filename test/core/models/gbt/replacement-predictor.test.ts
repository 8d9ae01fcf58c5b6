import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { binFeatures } from '../../../../src/core/models/gbt/bin-features.ts'
import { fitBoosted } from '../../../../src/core/models/gbt/fit-boosted.ts'
import { BoostedModel } from '../../../../src/core/models/gbt/boosted-model.ts'
import { createTreeReplacementPredictor } from '../../../../src/core/models/gbt/replacement-predictor.ts'
import type { Tree } from '../../../../src/core/models/gbt/tree.ts'
import { createRandom } from '../../../../src/core/statistics/random.ts'

function data(rows: number, seed: number, task: 'binary' | 'regression' | 'multiclass') {
  const random = createRandom(seed)
  const columns = Array.from({ length: 6 }, () => new Float64Array(rows))
  const y = new Float64Array(rows)
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < 6; j++) columns[j][i] = random.next() < 0.05 ? NaN : random.normal()
    const signal = 2 * (columns[0][i] || 0) - (columns[1][i] || 0) * (columns[2][i] || 0) + 0.5 * random.normal()
    y[i] = task === 'binary' ? (signal > 0 ? 1 : 0) : task === 'multiclass' ? (signal < -0.7 ? 0 : signal < 0.7 ? 1 : 2) : signal
  }
  const matrix: FeatureMatrix = {
    rows,
    features: columns.map((_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const })),
    columns,
  }
  return { matrix, y }
}

describe('BoostedModel.createReplacementPredictor(base)', () => {
  for (const task of ['regression', 'binary', 'multiclass'] as const) {
    it(`matches a full ${task} prediction of the replaced matrix, for one column and for a group`, () => {
      const train = data(800, 1, task)
      const width = task === 'multiclass' ? 3 : 1
      const model = fitBoosted(binFeatures(train.matrix), train.y, {
        task,
        ...(task === 'multiclass' ? { classCount: 3 } : {}),
        seed: 3,
        settings: { trees: 40, maxDepth: 4, learningRate: 0.2, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 },
      })
      const base = data(300, 2, task).matrix
      const predictor = model.createReplacementPredictor(base)!
      const random = createRandom(9)
      for (const names of [['x1'], ['x2', 'x3'], ['x6']]) {
        const draws = 3
        const replaced = new Map(
          names.map((name) => [name, Float64Array.from({ length: base.rows * draws }, () => (random.next() < 0.1 ? NaN : random.normal()))]),
        )
        const fast = predictor.predict(replaced, draws)
        for (let k = 0; k < draws; k++) {
          const columns = base.features.map((f, j) =>
            replaced.has(f.name) ? replaced.get(f.name)!.slice(k * base.rows, (k + 1) * base.rows) : base.columns[j],
          )
          // Multiclass: row-major [rows, K] per draw, draw k's block at k · rows · K.
          const full = model.predictRaw({ ...base, columns })
          expect(fast.length).toBe(draws * base.rows * width)
          for (let i = 0; i < base.rows * width; i++) expect(fast[k * base.rows * width + i]).toBeCloseTo(full[i], 12)
        }
      }
    })
  }
})

/**
 * A random tree of up to `depth` levels over F features, with random thresholds and NaN directions,
 * its nodes numbered in depth-first order (not the breadth-first order the learner writes), so the
 * evaluator's own renumbering is exercised too.
 */
function randomTree(random: ReturnType<typeof createRandom>, F: number, depth: number): Tree {
  const feature: number[] = []
  const threshold: number[] = []
  const left: number[] = []
  const right: number[] = []
  const missingGoesLeft: number[] = []
  const value: number[] = []
  const grow = (level: number): number => {
    const id = feature.length
    feature.push(-1)
    threshold.push(0)
    left.push(-1)
    right.push(-1)
    missingGoesLeft.push(0)
    value.push(0)
    if (level === depth || (level > 0 && random.next() < 0.2)) {
      value[id] = random.normal()
      return id
    }
    feature[id] = random.int(F)
    threshold[id] = random.normal()
    missingGoesLeft[id] = random.next() < 0.5 ? 1 : 0
    left[id] = grow(level + 1)
    right[id] = grow(level + 1)
    return id
  }
  grow(0)
  return {
    feature: Int32Array.from(feature),
    threshold: Float64Array.from(threshold),
    left: Int32Array.from(left),
    right: Int32Array.from(right),
    missingGoesLeft: Uint8Array.from(missingGoesLeft),
    value: Float64Array.from(value),
  }
}

describe('createTreeReplacementPredictor on random ensembles (exact against a full re-evaluation)', () => {
  const F = 7
  for (const task of ['regression', 'binary'] as const) {
    it(`gives every unit what BoostedModel.predictRaw gives the replaced matrix (${task}, NaN routing, groups)`, () => {
      const random = createRandom(task === 'binary' ? 101 : 102)
      const trees = Array.from({ length: 30 }, () => randomTree(random, F, 1 + random.int(6)))
      const featureNames = Array.from({ length: F }, (_, j) => `f${j}`)
      const model = new BoostedModel({ task, featureNames, baseScore: 0.3, trees })
      const rows = 257 // more than one block of rows
      const draw = () => (random.next() < 0.15 ? NaN : random.normal())
      // The base matrix carries an extra column the model does not read, in front.
      const base = {
        rows,
        features: [{ name: 'unused', kind: 'numeric' as const }, ...featureNames.map((name) => ({ name, kind: 'numeric' as const }))],
        columns: Array.from({ length: F + 1 }, () => Float64Array.from({ length: rows }, draw)),
      }
      const draws = 3
      const unitNames = [['f0'], ['f3'], ['f6'], ['f1', 'f4'], ['f2', 'f5', 'f0'], ['unused'], ['f3']]
      const units = unitNames.map((names) => new Map(names.map((name) => [name, Float64Array.from({ length: rows * draws }, draw)])))
      const predictor = createTreeReplacementPredictor({ ...model.ensemble, link: task === 'binary' ? 'logistic' : 'identity' }, base)!
      const batched = predictor.predictMany!(units, draws)
      units.forEach((replaced, u) => {
        const single = predictor.predict(replaced, draws)
        for (let k = 0; k < draws; k++) {
          const columns = base.features.map((f, j) => replaced.get(f.name)?.slice(k * rows, (k + 1) * rows) ?? base.columns[j])
          const full = model.predictRaw({ ...base, columns })
          for (let i = 0; i < rows; i++) {
            expect(Math.abs(batched[u][k * rows + i] - full[i])).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(full[i])))
            expect(single[k * rows + i]).toBe(batched[u][k * rows + i])
          }
        }
      })
      // Nothing replaced (or only a column the model ignores): bit for bit the full prediction.
      const untouched = model.predictRaw(base)
      expect(Array.from(predictor.predict(new Map(), 1))).toEqual(Array.from(untouched))
      expect(Array.from(batched[5].subarray(0, rows))).toEqual(Array.from(untouched))
    })
  }

  it('rounds inputs to float32 when asked, as a float32 model compares', () => {
    // One split at the float32 value nearest 0.1 (0.100000001490116...; float32 spacing there is
    // 2^-27 = 7.45e-9): the double 0.1 is below it and goes left either way; 0.1000000016 is above it
    // as a double and goes right, but rounds to the threshold in float32 and goes left.
    const tree: Tree = {
      feature: Int32Array.of(0, -1, -1),
      threshold: Float64Array.of(Math.fround(0.1)),
      left: Int32Array.of(1, -1, -1),
      right: Int32Array.of(2, -1, -1),
      missingGoesLeft: Uint8Array.of(0, 0, 0),
      value: Float64Array.of(0, -1, 1),
    }
    const base = { rows: 2, features: [{ name: 'a', kind: 'numeric' as const }], columns: [Float64Array.of(0.1, 0.1000000016)] }
    const ensemble = { featureNames: ['a'], baseScore: 0, trees: [tree], link: 'identity' as const }
    expect(Array.from(createTreeReplacementPredictor(ensemble, base)!.predict(new Map(), 1))).toEqual([-1, 1])
    expect(Array.from(createTreeReplacementPredictor({ ...ensemble, float32Inputs: true }, base)!.predict(new Map(), 1))).toEqual([-1, -1])
  })
})
