import { describe, expect, it } from 'vitest'
import { multiclassLogLoss } from '../../../src/core/metrics/multiclass-log-loss.ts'
import { multiclassP, multiclassY } from './examples.ts'

describe('multiclassLogLoss(y, probabilities)', () => {
  it('matches scikit-learn on an [N, 3] probability matrix', () => {
    // computed with scikit-learn 1.2.1: log_loss(multiclassY, P, eps=1e-15) -> 0.7698294805550732
    expect(multiclassLogLoss(multiclassY, multiclassP)).toBeCloseTo(0.7698294805550732, 12)
    // By hand: uniform probabilities over K classes cost ln K per row.
    expect(multiclassLogLoss([0, 2], [1 / 3, 1 / 3, 1 / 3, 1 / 3, 1 / 3, 1 / 3])).toBeCloseTo(Math.log(3), 12)
  })

  it('clips to [1e-15, 1 - 1e-15] and renormalizes each row, as scikit-learn does', () => {
    // computed with scikit-learn 1.2.1: log_loss([0,1,2], [[1,0,0],[1,0,0],[0,0,1]], eps=1e-15) -> 11.512925464970229
    expect(multiclassLogLoss([0, 1, 2], [1, 0, 0, 1, 0, 0, 0, 0, 1])).toBeCloseTo(11.512925464970229, 10)
  })

  it('is NaN for no rows, and refuses a matrix of the wrong width, class indices out of range and probabilities outside [0, 1]', () => {
    expect(multiclassLogLoss([], [])).toBeNaN()
    expect(() => multiclassLogLoss([0, 1], [0.5, 0.5, 1])).toThrow('multiclassLogLoss needs an [N, K] probability matrix with K >= 2 for 2 targets, got 3 values')
    expect(() => multiclassLogLoss([0, 3], [0.5, 0.3, 0.2, 0.5, 0.3, 0.2])).toThrow('multiclassLogLoss needs class indices from 0 to 2, got 3 at index 1')
    expect(() => multiclassLogLoss([0], [1.2, 0, 0])).toThrow('multiclassLogLoss needs probabilities in [0, 1], got 1.2 at row 0, class 0')
  })
})
