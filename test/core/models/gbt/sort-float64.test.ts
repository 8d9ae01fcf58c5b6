import { describe, expect, it } from 'vitest'
import { sortFloat64 } from '../../../../src/core/models/gbt/sort-float64.ts'
import { createRandom } from '../../../../src/core/statistics/random.ts'

// The reference is the ECMAScript built-in, Float64Array.prototype.sort (ECMAScript 2024, 23.2.3.29:
// numeric order, -0 before +0), compared value by value with Object.is so that -0 and +0 count apart.
function expectBuiltInOrder(values: Float64Array): void {
  const expected = Float64Array.from(values).sort()
  const sorted = sortFloat64(Float64Array.from(values))
  expect(sorted.length).toBe(expected.length)
  let firstDifference = -1
  for (let i = 0; i < expected.length && firstDifference < 0; i++) if (!Object.is(sorted[i], expected[i])) firstDifference = i
  expect(firstDifference).toBe(-1)
}

describe('sortFloat64(values)', () => {
  const random = createRandom(3)
  const draw = (n: number, value: (i: number) => number) => Float64Array.from({ length: n }, (_, i) => value(i))

  it('sorts as the built-in sort does: uniform, wide-range, signed, tied and whole-number values', () => {
    expectBuiltInOrder(draw(50_000, () => random.next()))
    expectBuiltInOrder(draw(20_000, () => (random.next() - 0.5) * 10 ** (random.next() * 600 - 300)))
    expectBuiltInOrder(draw(20_000, () => Math.floor(random.next() * 9) - 4))
    expectBuiltInOrder(draw(5_000, () => random.normal()))
  })

  it('keeps -0 before +0 and orders infinities, subnormals and the largest values', () => {
    const specials = [-0, 0, Infinity, -Infinity, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MAX_VALUE, 1, -1]
    expectBuiltInOrder(draw(4_000, (i) => specials[i % specials.length]))
  })

  it('sorts a short array (the built-in path) and one where every value is the same', () => {
    expectBuiltInOrder(Float64Array.of(3, -0, 1, 0, -2))
    expectBuiltInOrder(new Float64Array(3_000).fill(0.25))
    expect(sortFloat64(new Float64Array(0)).length).toBe(0)
  })

  it('sorts in place and returns its argument', () => {
    const values = draw(2_000, () => random.next())
    expect(sortFloat64(values)).toBe(values)
    for (let i = 1; i < values.length; i++) expect(values[i - 1] <= values[i]).toBe(true)
  })
})
