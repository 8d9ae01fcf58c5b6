import { describe, expect, it } from 'vitest'
import { accuracy } from '../../../src/core/metrics/accuracy.ts'
import { binaryP, binaryY } from './examples.ts'

describe('accuracy(y, p, {threshold})', () => {
  it('predicts 1 above 0.5 by default', () => {
    // computed with scikit-learn 1.2.1: accuracy_score(binaryY, binaryP > 0.5) -> 0.75
    expect(accuracy(binaryY, binaryP)).toBeCloseTo(0.75, 12)
  })

  it('uses the threshold given', () => {
    // By hand: binaryY has 10 positives and 10 negatives; above 0.85 are only 0.9 and 0.95, both
    // positive, so 2 positives and all 10 negatives are right: 12/20.
    expect(accuracy(binaryY, binaryP, { threshold: 0.85 })).toBeCloseTo(0.6, 12)
  })

  it('predicts 0 for a probability exactly at the threshold', () => {
    expect(accuracy([0, 1], [0.5, 0.5])).toBeCloseTo(0.5, 12)
    expect(accuracy([0], [0.5])).toBe(1)
  })

  it('is NaN for no rows or a NaN probability', () => {
    expect(accuracy([], [])).toBeNaN()
    expect(accuracy([1, 0], [0.9, NaN])).toBeNaN()
  })
})
