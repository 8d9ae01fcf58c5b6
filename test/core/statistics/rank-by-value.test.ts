import { describe, expect, it } from 'vitest'
import { rankByValue } from '../../../src/core/statistics/rank-by-value.ts'

describe('rankByValue(items, value)', () => {
  const units = [
    { name: 'weight_kg', mean: 0.1 },
    { name: 'distance_km', mean: 0.3 },
    { name: 'Zone', mean: 0.1 },
    { name: 'area', mean: 0.1 },
    { name: 'stops', mean: -0.02 },
  ]

  it('ranks highest first and breaks ties by name in code-unit order (capitals before lower case)', () => {
    expect(rankByValue(units, (u) => u.mean).map((u) => u.name)).toEqual(['distance_km', 'Zone', 'area', 'weight_kg', 'stops'])
    expect(rankByValue(units, (u) => -u.mean).map((u) => u.name)).toEqual(['stops', 'Zone', 'area', 'weight_kg', 'distance_km'])
  })

  it('returns a new array and leaves the input in its order', () => {
    const before = units.map((u) => u.name)
    const ranked = rankByValue(units, (u) => u.mean)
    expect(ranked).not.toBe(units)
    expect(units.map((u) => u.name)).toEqual(before)
  })

  it('orders NaN values by name among themselves', () => {
    const withNaN = [{ name: 'b', mean: NaN }, { name: 'a', mean: NaN }]
    expect(rankByValue(withNaN, (u) => u.mean).map((u) => u.name)).toEqual(['a', 'b'])
  })
})
