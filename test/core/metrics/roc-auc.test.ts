import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { rocAuc } from '../../../src/core/metrics/roc-auc.ts'
import { binaryP, binaryY } from './examples.ts'

/** The definition, pair by pair: O(n^2), for checking the sort-and-merge version. */
function pairwiseAuc(y: number[], s: number[]): number {
  let pairs = 0
  let count = 0
  for (let i = 0; i < y.length; i++) {
    for (let j = 0; j < y.length; j++) {
      if (y[i] === 1 && y[j] === 0) {
        count++
        pairs += s[i] > s[j] ? 1 : s[i] === s[j] ? 0.5 : 0
      }
    }
  }
  return count === 0 ? NaN : pairs / count
}

describe('rocAuc(y, score)', () => {
  it('matches the scikit-learn roc_auc_score docstring example', () => {
    // scikit-learn roc_auc_score docstring example; computed with scikit-learn 1.2.1 (Debian python3-sklearn):
    // roc_auc_score([0,0,1,1], [0.1,0.4,0.35,0.8]) = 0.75.
    expect(rocAuc([0, 0, 1, 1], [0.1, 0.4, 0.35, 0.8])).toBeCloseTo(0.75, 12)
  })

  it('counts tied scores as half a pair (midranks)', () => {
    // computed with scikit-learn 1.2.1: roc_auc_score(binaryY, binaryP) -> 0.875
    expect(rocAuc(binaryY, binaryP)).toBeCloseTo(0.875, 12)
    // By hand: every score tied -> 0.5.
    expect(rocAuc([0, 1, 0, 1], [0.3, 0.3, 0.3, 0.3])).toBeCloseTo(0.5, 12)
  })

  it('equals the pairwise Mann-Whitney count on any input (property)', () => {
    const sample = fc.array(fc.tuple(fc.constantFrom(0, 1), fc.integer({ min: -5, max: 5 })), { minLength: 1, maxLength: 60 })
    fc.assert(
      fc.property(sample, (rows) => {
        const y = rows.map((r) => r[0])
        const s = rows.map((r) => r[1] / 4)
        const expected = pairwiseAuc(y, s)
        if (Number.isNaN(expected)) expect(rocAuc(y, s)).toBeNaN()
        else expect(rocAuc(y, s)).toBeCloseTo(expected, 12)
      }),
      { seed: 7, numRuns: 300 },
    )
  })

  it('does not change under a strictly increasing transform of the scores or a reordering of rows', () => {
    const logit = binaryP.map((p) => Math.log(p / (1 - p)))
    expect(rocAuc(binaryY, logit)).toBeCloseTo(rocAuc(binaryY, binaryP), 12)
    expect(rocAuc([...binaryY].reverse(), [...binaryP].reverse())).toBeCloseTo(rocAuc(binaryY, binaryP), 12)
  })

  it('is NaN when a class is absent, for no rows, or for a NaN score', () => {
    expect(rocAuc([1, 1, 1], [0.2, 0.5, 0.9])).toBeNaN()
    expect(rocAuc([0, 0], [0.2, 0.5])).toBeNaN()
    expect(rocAuc([], [])).toBeNaN()
    expect(rocAuc([0, 1], [0.2, NaN])).toBeNaN()
  })

  it('throws a RangeError for unpaired input or targets other than 0 and 1', () => {
    expect(() => rocAuc([0, 1], [0.5])).toThrow('rocAuc needs paired samples, got 2 targets and 1 predictions')
    expect(() => rocAuc([0, 2], [0.5, 0.6])).toThrow('rocAuc needs targets of 0 or 1, got 2 at index 1')
  })
})
