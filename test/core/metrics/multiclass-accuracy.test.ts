import { describe, expect, it } from 'vitest'
import { argmaxRow, multiclassAccuracy } from '../../../src/core/metrics/multiclass-accuracy.ts'
import { multiclassP, multiclassY } from './examples.ts'

describe('multiclassAccuracy(y, probabilities)', () => {
  it('matches scikit-learn on the most probable class, ties to the lowest class', () => {
    // computed with scikit-learn 1.2.1 and NumPy: accuracy_score(multiclassY, P.argmax(1)) -> 0.7, with
    // P.argmax(1) = [0 1 2 1 2 0 1 2 0 2] (row 8, [0.4, 0.4, 0.2], ties to class 0).
    expect(multiclassAccuracy(multiclassY, multiclassP)).toBe(0.7)
    expect(Array.from({ length: 10 }, (_, i) => argmaxRow(multiclassP, i * 3, 3))).toEqual([0, 1, 2, 1, 2, 0, 1, 2, 0, 2])
  })

  it('is NaN for no rows or a NaN probability', () => {
    expect(multiclassAccuracy([], [])).toBeNaN()
    expect(multiclassAccuracy([0], [0.2, NaN, 0.3])).toBeNaN()
  })
})
