import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import type { FeatureInfo, FeatureMatrix, Task } from '../../../src/core/data/dataset.ts'
import { exportOnnx } from '../../../src/core/models/export-onnx.ts'
import { binFeatures } from '../../../src/core/models/gbt/bin-features.ts'
import { BoostedModel } from '../../../src/core/models/gbt/boosted-model.ts'
import { fitBoosted } from '../../../src/core/models/gbt/fit-boosted.ts'
import { fitLogistic } from '../../../src/core/models/linear/fit-logistic.ts'
import { fitRidge } from '../../../src/core/models/linear/fit-ridge.ts'
import type { LinearModel } from '../../../src/core/models/linear/linear-model.ts'
import { createRandom, type Random } from '../../../src/core/statistics/random.ts'
import { loadOnnxModel } from '../../../src/adapters/onnx/load-onnx-model.ts'
import { missingReference } from '../../helpers/reference-packages.ts'

// The reference outside the project here is onnxruntime 1.30 (and onnx 1.12's checker): the exported
// file, run by onnxruntime, must predict what the built-in evaluator predicts.

const FEATURES: FeatureInfo[] = [
  { name: 'distance_km', kind: 'numeric' },
  { name: 'stop_count', kind: 'numeric' },
  { name: 'depot', kind: 'categorical', categories: ['east', 'harbour', 'north', 'west'] },
  { name: 'parcel_weight_kg', kind: 'numeric' },
]

/** Random rows with about 10% missing values per column; the depot is a code 0..3. */
function randomMatrix(random: Random, rows: number): FeatureMatrix {
  const column = (draw: () => number) =>
    Float64Array.from({ length: rows }, () => (random.next() < 0.1 ? NaN : draw()))
  return {
    rows,
    features: FEATURES,
    columns: [
      column(() => 40 * random.next()),
      column(() => random.int(12)),
      column(() => random.int(4)),
      column(() => Math.exp(random.normal())),
    ],
  }
}

/** A made-up late-delivery score; NaN counts as 0. */
function lateness(x: FeatureMatrix, i: number, random: Random): number {
  const v = (j: number) => (Number.isNaN(x.columns[j][i]) ? 0 : x.columns[j][i])
  return Math.sin(v(0) / 6) * 2 + 0.3 * v(1) + [0, 1, -0.5, 0.25][v(2)] - 0.4 * v(3) + 0.5 * random.normal()
}

function trainingData(task: Task, seed: number): { x: FeatureMatrix; y: Float64Array } {
  const random = createRandom(seed)
  const x = randomMatrix(random, 600)
  const y = Float64Array.from({ length: x.rows }, (_, i) => {
    const s = lateness(x, i, random)
    return task === 'binary' ? Number(s > 1.5) : s
  })
  return { x, y }
}

const boosted = (task: Task) => {
  const { x, y } = trainingData(task, task === 'binary' ? 11 : 12)
  const settings = { trees: 40, maxDepth: 4, learningRate: 0.2, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 1 }
  return fitBoosted(binFeatures(x), y, { task, settings, seed: 5 })
}

/** Fresh rows, plus rows set exactly on split thresholds so that `value <= threshold` is tested at equality. */
function evaluationData(model: BoostedModel | LinearModel): FeatureMatrix {
  const x = randomMatrix(createRandom(99), 2000)
  if ('ensemble' in model) {
    let i = 0
    for (const tree of model.ensemble.trees) {
      for (let node = 0; node < tree.feature.length && i < x.rows; node++) {
        const f = tree.feature[node]
        if (f >= 0) x.columns[FEATURES.findIndex((feature) => feature.name === model.featureNames[f])][i++] = tree.threshold[node]
      }
    }
  }
  return x
}

async function largestDifference(model: BoostedModel | LinearModel): Promise<number> {
  // evaluator 'onnxruntime': onnxruntime itself runs the file, not plumbline's reading of its trees.
  const onnx = await loadOnnxModel(exportOnnx(model), { source: 'exported.onnx', task: model.task, features: FEATURES, evaluator: 'onnxruntime' })
  expect(onnx.featureNames).toEqual(model.featureNames)
  const x = evaluationData(model)
  const expected = model.predictRaw(x)
  const actual = await onnx.predict({ ...x, features: model.featureNames.map((name) => FEATURES.find((f) => f.name === name)!), columns: model.featureNames.map((name) => x.columns[FEATURES.findIndex((f) => f.name === name)]) })
  let largest = 0
  for (let i = 0; i < x.rows; i++) largest = Math.max(largest, Math.abs(actual[i] - expected[i]))
  return largest
}

describe('exportOnnx(model)', () => {
  const models: Array<[string, () => BoostedModel | LinearModel]> = [
    ['a regression boosted model (TreeEnsembleRegressor)', () => boosted('regression')],
    ['a binary boosted model (TreeEnsembleRegressor + Sigmoid)', () => boosted('binary')],
    ['a ridge model (MatMul + Add, LabelEncoder for the categorical column)', () => {
      const { x, y } = trainingData('regression', 21)
      return fitRidge(x, y, { l2: 1 })
    }],
    ['a logistic model (MatMul + Add + Sigmoid)', () => {
      const { x, y } = trainingData('binary', 22)
      return fitLogistic(x, y, { l2: 1 })
    }],
  ]

  for (const [what, make] of models) {
    it(`writes ${what} that onnxruntime evaluates like the built-in evaluator, to 1e-5, with missing values`, async () => {
      expect(await largestDifference(make())).toBeCloseTo(0, 5)
    })
  }

  it('puts the feature order in the metadata, so a model whose columns are in another order than the data still reads them right', async () => {
    const model = boosted('regression')
    // The same trees with the model's columns reversed: node features are remapped to the new positions.
    const names = [...model.featureNames].reverse()
    const position = new Map(names.map((name, k) => [name, k]))
    const remap = (f: number) => (f < 0 ? f : position.get(model.featureNames[f])!)
    const reversed = new BoostedModel({
      ...model.ensemble,
      featureNames: names,
      trees: model.ensemble.trees.map((tree) => ({ ...tree, feature: tree.feature.map(remap) })),
    })
    const x = evaluationData(model)
    expect(reversed.predictRaw(x)).toEqual(model.predictRaw(x))
    expect(await largestDifference(reversed)).toBeCloseTo(0, 5)
  })

  it.skipIf(missingReference('python3-onnx', 'test/core/models/export-onnx.test.ts', 'onnx.checker') !== undefined)('writes files that pass onnx 1.12’s full model check (Debian python3-onnx)', () => {
    const directory = mkdtempSync(join(tmpdir(), 'plumbline-export-'))
    try {
      const files = models.map(([, make], k) => {
        const path = join(directory, `model-${k}.onnx`)
        writeFileSync(path, exportOnnx(make()))
        return path
      })
      const script = 'import sys, onnx\nfor p in sys.argv[1:]: onnx.checker.check_model(onnx.load(p), full_check=True)\nprint("checked", len(sys.argv) - 1)'
      expect(execFileSync('/usr/bin/python3', ['-c', script, ...files], { encoding: 'utf8' }).trim()).toBe('checked 4')
    } finally {
      rmSync(directory, { recursive: true, force: true })
    }
  })
})
