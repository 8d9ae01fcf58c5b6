import { describe, expect, it } from 'vitest'
import { logLoss } from '../../../src/core/metrics/log-loss.ts'
import { binaryP, binaryY } from './examples.ts'

describe('logLoss(y, p)', () => {
  it('matches scikit-learn on probabilities inside (0, 1)', () => {
    // computed with scikit-learn 1.2.1: log_loss(binaryY, binaryP, eps=1e-15) -> 0.45737614447650266
    expect(logLoss(binaryY, binaryP)).toBeCloseTo(0.45737614447650266, 12)
    // By hand: a coin flip costs ln 2 per row.
    expect(logLoss([1, 0], [0.5, 0.5])).toBeCloseTo(Math.LN2, 12)
  })

  it('clips p to [1e-15, 1 - 1e-15] before taking 1 - p, as scikit-learn does', () => {
    // computed with scikit-learn 1.2.1, eps=1e-15 (its default eps="auto" gives 18.0218 for the first):
    // log_loss([1,0,1,0], [1,1,0,0]) -> 17.26958809681289; log_loss([1], [0], labels=[0,1]) -> 34.538776394910684;
    // log_loss([0], [1], labels=[0,1]) -> 34.53957599234088.
    expect(logLoss([1, 0, 1, 0], [1, 1, 0, 0])).toBeCloseTo(17.26958809681289, 12)
    expect(logLoss([1], [0])).toBeCloseTo(34.538776394910684, 12)
    expect(logLoss([0], [1])).toBeCloseTo(34.53957599234088, 12)
  })

  it('is NaN for no rows or a NaN probability, and refuses probabilities outside [0, 1]', () => {
    expect(logLoss([], [])).toBeNaN()
    expect(logLoss([1, 0], [NaN, 0.2])).toBeNaN()
    expect(() => logLoss([1], [1.2])).toThrow('logLoss needs probabilities in [0, 1], got 1.2 at index 0')
  })
})
