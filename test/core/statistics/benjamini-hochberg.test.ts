import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { benjaminiHochberg } from '../../../src/core/statistics/benjamini-hochberg.ts'
import { isMonotoneAdjustment } from './adjusted-p-values.ts'

// The 15 p-values of Benjamini & Hochberg (1995), JRSS-B 57(1), sorted (list from memory).
const paper = [
  0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1,
]
// Benjamini–Hochberg adjusted p-values computed from that list (SciPy 1.17.1
// scipy.stats.false_discovery_control agrees).
const paperAdjusted = [
  0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.0638571, 0.0638571, 0.0645, 0.0765, 0.486, 0.581182, 0.714875, 0.753231,
  0.813214, 1,
]

describe('benjaminiHochberg(pValues)', () => {
  it('adjusts the style-guide example in input order', () => {
    // STYLE.md §6: [0.01, 0.04, 0.03, 0.20] -> [0.04, 0.0533…, 0.0533…, 0.20]
    // (scipy.stats.false_discovery_control(p, method='bh'), SciPy 1.17.1).
    const adjusted = benjaminiHochberg([0.01, 0.04, 0.03, 0.2])
    expect(adjusted[0]).toBeCloseTo(0.04, 14)
    expect(adjusted[1]).toBeCloseTo(0.16 / 3, 14)
    expect(adjusted[2]).toBeCloseTo(0.16 / 3, 14)
    expect(adjusted[3]).toBeCloseTo(0.2, 14)
  })
  it('reproduces the adjusted values of the 1995 example, with 4 rejections at 0.05', () => {
    const adjusted = benjaminiHochberg(paper)
    paperAdjusted.forEach((value, i) => expect(adjusted[i]).toBeCloseTo(value, 6))
    expect(Array.from(adjusted).filter((q) => q <= 0.05).length).toBe(4)
  })
  it('returns each adjusted value at its input position', () => {
    const order = [14, 3, 9, 0, 7, 12, 1, 5, 10, 2, 13, 6, 8, 11, 4]
    const adjusted = benjaminiHochberg(order.map((i) => paper[i]))
    order.forEach((i, position) => expect(adjusted[position]).toBeCloseTo(paperAdjusted[i], 6))
  })
  it('returns an empty array for no p-values', () => {
    expect(benjaminiHochberg([]).length).toBe(0)
  })
  it('refuses values that are not probabilities', () => {
    expect(() => benjaminiHochberg([0.2, 1.5])).toThrow(
      new RangeError('benjaminiHochberg needs p-values in [0, 1], got 1.5 at index 1'),
    )
    expect(() => benjaminiHochberg([NaN])).toThrow(
      new RangeError('benjaminiHochberg needs p-values in [0, 1], got NaN at index 0'),
    )
  })
  it('never lowers a p-value, never exceeds 1, and keeps the order of the raw p-values', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { maxLength: 40 }), (p) =>
        isMonotoneAdjustment(p, benjaminiHochberg(p)),
      ),
    )
  })
})
