import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { binFeatures } from '../../../../src/core/models/gbt/bin-features.ts'
import { fitBoosted } from '../../../../src/core/models/gbt/fit-boosted.ts'
import { createRandom } from '../../../../src/core/statistics/random.ts'

function data(rows: number, seed: number, task: 'binary' | 'regression') {
  const random = createRandom(seed)
  const columns = Array.from({ length: 6 }, () => new Float64Array(rows))
  const y = new Float64Array(rows)
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < 6; j++) columns[j][i] = random.next() < 0.05 ? NaN : random.normal()
    const signal = 2 * (columns[0][i] || 0) - (columns[1][i] || 0) * (columns[2][i] || 0) + 0.5 * random.normal()
    y[i] = task === 'binary' ? (signal > 0 ? 1 : 0) : signal
  }
  const matrix: FeatureMatrix = {
    rows,
    features: columns.map((_, j) => ({ name: `x${j + 1}`, kind: 'numeric' as const })),
    columns,
  }
  return { matrix, y }
}

describe('BoostedModel.createReplacementPredictor(base)', () => {
  for (const task of ['regression', 'binary'] as const) {
    it(`matches a full ${task} prediction of the replaced matrix, for one column and for a group`, () => {
      const train = data(800, 1, task)
      const model = fitBoosted(binFeatures(train.matrix), train.y, {
        task,
        seed: 3,
        settings: { trees: 40, maxDepth: 4, learningRate: 0.2, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 },
      })
      const base = data(300, 2, task).matrix
      const predictor = model.createReplacementPredictor(base)
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
          const full = model.predictRaw({ ...base, columns })
          for (let i = 0; i < base.rows; i++) expect(fast[k * base.rows + i]).toBeCloseTo(full[i], 12)
        }
      }
    })
  }
})
