import { describe, expect, it } from 'vitest'
import { brierScore } from '../../../src/core/metrics/brier-score.ts'
import { binaryP, binaryY } from './examples.ts'

describe('brierScore(y, p)', () => {
  it('matches scikit-learn brier_score_loss', () => {
    // computed with scikit-learn 1.2.1: brier_score_loss(binaryY, binaryP) -> 0.15024999999999997
    expect(brierScore(binaryY, binaryP)).toBeCloseTo(0.15025, 12)
    // By hand: (0.8 - 1)^2 and (0.4 - 0)^2 -> (0.04 + 0.16) / 2.
    expect(brierScore([1, 0], [0.8, 0.4])).toBeCloseTo(0.1, 12)
  })

  it('is NaN for no rows or a NaN probability, and refuses probabilities outside [0, 1]', () => {
    expect(brierScore([], [])).toBeNaN()
    expect(brierScore([1], [NaN])).toBeNaN()
    expect(() => brierScore([0, 1], [0.5, -0.1])).toThrow('brierScore needs probabilities in [0, 1], got -0.1 at index 1')
  })
})
