import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../../src/core/data/dataset.ts'
import { binFeatures, MISSING_BIN } from '../../../../src/core/models/gbt/bin-features.ts'
import { createRandom } from '../../../../src/core/statistics/random.ts'

function matrixOf(...columns: number[][]): FeatureMatrix {
  return {
    rows: columns[0].length,
    features: columns.map((_, j) => ({ name: `c${j}`, kind: 'numeric' as const })),
    columns: columns.map((c) => Float64Array.from(c)),
  }
}

describe('binFeatures(matrix, {maxBins})', () => {
  it('gives each distinct value its own bin when there are few, with midpoint edges and the maximum last', () => {
    // By hand: distinct values 1, 2, 4, 8 -> edges 1.5, 3, 6, 8.
    const binned = binFeatures(matrixOf([4, 1, 8, 2, 4, NaN]))
    expect(Array.from(binned.upperEdges[0])).toEqual([1.5, 3, 6, 8])
    expect(Array.from(binned.codes[0])).toEqual([2, 0, 3, 1, 2, MISSING_BIN])
    expect(binned.binCounts[0]).toBe(4)
  })

  it('keeps every column in one feature-major block, in shared memory when asked', () => {
    const matrix = matrixOf([4, 1, 8, 2], [NaN, 5, 5, 6])
    const plain = binFeatures(matrix)
    const shared = binFeatures(matrix, { shared: true })
    expect(Array.from(plain.matrix)).toEqual([2, 0, 3, 1, MISSING_BIN, 0, 0, 1])
    expect(plain.codes[1].buffer).toBe(plain.matrix.buffer)
    expect(shared.matrix.buffer).toBeInstanceOf(SharedArrayBuffer)
    expect(Array.from(shared.matrix)).toEqual(Array.from(plain.matrix))
    expect(Array.from(shared.codes[1])).toEqual([MISSING_BIN, 0, 0, 1])
  })

  it('closes quantile bins greedily at (rows left) / (bins left)', () => {
    // By hand, 1..10 into 5 bins: {1,2} {3,4} {5,6} {7,8} {9,10}.
    const binned = binFeatures(matrixOf([10, 9, 8, 7, 6, 5, 4, 3, 2, 1]), { maxBins: 5 })
    expect(Array.from(binned.upperEdges[0])).toEqual([2.5, 4.5, 6.5, 8.5, 10])
    expect(Array.from(binned.codes[0])).toEqual([4, 4, 3, 3, 2, 2, 1, 1, 0, 0])
  })

  it('gives a value shared by many rows a bin of its own', () => {
    // By hand, six 0s then 1..4 into 3 bins: {0} holds 6 of 10 rows, then {1,2} and {3,4}.
    const binned = binFeatures(matrixOf([0, 0, 0, 0, 0, 0, 1, 2, 3, 4]), { maxBins: 3 })
    expect(Array.from(binned.upperEdges[0])).toEqual([0.5, 2.5, 4])
  })

  it('makes "bin <= b" the same split as "value <= upperEdges[b]" on every training value', () => {
    const random = createRandom(11)
    const values = Array.from({ length: 2000 }, (_, i) => (i % 7 === 0 ? NaN : Math.round(random.normal() * 50) / 10))
    const binned = binFeatures(matrixOf(values), { maxBins: 32 })
    const edges = binned.upperEdges[0]
    expect(edges.length).toBeLessThanOrEqual(32)
    let disagreements = 0
    for (let i = 0; i < values.length; i++) {
      const code = binned.codes[0][i]
      if (Number.isNaN(values[i])) {
        if (code !== MISSING_BIN) disagreements++
        continue
      }
      for (let b = 0; b < edges.length; b++) if (values[i] <= edges[b] !== code <= b) disagreements++
    }
    expect(disagreements).toBe(0)
  })

  it('uses the lower value as the edge when the midpoint of two adjacent doubles rounds up', () => {
    // By hand: halfway between 1 - 2^-53 and 1 rounds (to even) to 1, which would put 1 in the lower bin.
    const below = 1 - 2 ** -53
    const binned = binFeatures(matrixOf([1, below]))
    expect(Array.from(binned.upperEdges[0])).toEqual([below, 1])
    expect(Array.from(binned.codes[0])).toEqual([1, 0])
  })

  it('gives an all-missing column no value bins and a constant column one', () => {
    const binned = binFeatures(matrixOf([NaN, NaN, NaN], [5, 5, 5]))
    expect(Array.from(binned.binCounts)).toEqual([0, 1])
    expect(Array.from(binned.codes[0])).toEqual([MISSING_BIN, MISSING_BIN, MISSING_BIN])
    expect(Array.from(binned.upperEdges[1])).toEqual([5])
  })

  it('bins categorical codes as ordered numbers', () => {
    const matrix: FeatureMatrix = {
      rows: 5,
      features: [{ name: 'depot', kind: 'categorical', categories: ['east', 'north', 'west'] }],
      columns: [Float64Array.from([2, 0, 1, 1, NaN])],
    }
    const binned = binFeatures(matrix)
    expect(Array.from(binned.codes[0])).toEqual([2, 0, 1, 1, MISSING_BIN])
    expect(Array.from(binned.upperEdges[0])).toEqual([0.5, 1.5, 2])
  })

  it('refuses more than 255 bins', () => {
    expect(() => binFeatures(matrixOf([1, 2]), { maxBins: 256 })).toThrow(
      new RangeError('binFeatures needs maxBins to be a whole number from 2 to 255, got 256'),
    )
  })
})
