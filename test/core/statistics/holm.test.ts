import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { holm } from '../../../src/core/statistics/holm.ts'
import { isMonotoneAdjustment } from './adjusted-p-values.ts'

// The 15 p-values of Benjamini & Hochberg (1995), JRSS-B 57(1), sorted (list from memory).
const paper = [
  0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1,
]

describe('holm(pValues)', () => {
  it('reproduces the Holm row of the check values, with 3 rejections at 0.05', () => {
    // Holm (1979) step-down adjusted p-values, computed from the list above.
    const expected = [0.0015, 0.0056, 0.0247, 0.114, 0.2211, 0.278, 0.278, 0.278, 0.3213, 1, 1, 1, 1, 1, 1]
    const adjusted = holm(paper)
    expected.forEach((value, i) => expect(adjusted[i]).toBeCloseTo(value, 12))
    expect(Array.from(adjusted).filter((p) => p <= 0.05).length).toBe(3)
  })
  it('returns each adjusted value at its input position', () => {
    // By hand: sorted 0.01, 0.02, 0.04 -> 3·0.01, max(0.03, 2·0.02), max(0.04, 0.04).
    const adjusted = holm([0.04, 0.01, 0.02])
    expect(adjusted[0]).toBeCloseTo(0.04, 15)
    expect(adjusted[1]).toBeCloseTo(0.03, 15)
    expect(adjusted[2]).toBeCloseTo(0.04, 15)
  })
  it('refuses values that are not probabilities', () => {
    expect(() => holm([-0.1])).toThrow(new RangeError('holm needs p-values in [0, 1], got -0.1 at index 0'))
  })
  it('never lowers a p-value, never exceeds 1, and keeps the order of the raw p-values', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { maxLength: 40 }), (p) =>
        isMonotoneAdjustment(p, holm(p)),
      ),
    )
  })
})
