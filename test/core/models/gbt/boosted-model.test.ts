import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { BoostedModel } from '../../../../src/core/models/gbt/boosted-model.ts'
import type { Tree } from '../../../../src/core/models/gbt/tree.ts'

// One stump on 'weight_kg': weight <= 2 (or missing) -> -1, else +3; base score 0.5.
const stump: Tree = {
  feature: Int32Array.of(0, -1, -1),
  threshold: Float64Array.of(2, 0, 0),
  left: Int32Array.of(1, -1, -1),
  right: Int32Array.of(2, -1, -1),
  missingGoesLeft: Uint8Array.of(1, 0, 0),
  value: Float64Array.of(0, -1, 3),
}

function matrix(columns: Record<string, number[]>): FeatureMatrix {
  const names = Object.keys(columns)
  return {
    rows: columns[names[0]].length,
    features: names.map((name) => ({ name, kind: 'numeric' as const })),
    columns: names.map((name) => Float64Array.from(columns[name])),
  }
}

describe('BoostedModel', () => {
  it('predictRaw goes left on value <= threshold and follows missingGoesLeft for NaN', () => {
    const model = new BoostedModel({ task: 'regression', featureNames: ['weight_kg'], baseScore: 0.5, trees: [stump] })
    expect(Array.from(model.predictRaw(matrix({ weight_kg: [1, 2, 2.5, NaN] })))).toEqual([-0.5, -0.5, 3.5, -0.5])
  })

  it('finds features by name, whatever the matrix order and extra columns', async () => {
    const model = new BoostedModel({ task: 'regression', featureNames: ['weight_kg'], baseScore: 0, trees: [stump] })
    const data = matrix({ distance_km: [9, 9], weight_kg: [5, 1] })
    expect(Array.from(await model.predict(data))).toEqual([3, -1])
  })

  it('returns the logistic of the raw score for a binary task', () => {
    const model = new BoostedModel({ task: 'binary', featureNames: ['weight_kg'], baseScore: 0, trees: [stump] })
    // 1 / (1 + e^-3) and 1 / (1 + e^1), by hand.
    const p = model.predictRaw(matrix({ weight_kg: [5, 1] }))
    expect(p[0]).toBeCloseTo(0.9525741268224334, 12)
    expect(p[1]).toBeCloseTo(0.2689414213699951, 12)
  })

  it('throws a RangeError naming a feature the matrix lacks', () => {
    const model = new BoostedModel({ task: 'regression', featureNames: ['weight_kg'], baseScore: 0, trees: [stump] })
    expect(() => model.predictRaw(matrix({ distance_km: [1] }))).toThrow(
      new RangeError("BoostedModel.predictRaw: the matrix has no feature named 'weight_kg'"),
    )
  })
})
