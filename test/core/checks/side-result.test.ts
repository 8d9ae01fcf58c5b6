import { describe, expect, it } from 'vitest'
import { mean, positiveShare, rankFeatures, rankKey, sideRanks } from '../../../src/core/checks/side-result.ts'
import type { FlooredImportance } from '../../../src/core/importance/compute-noise-floor.ts'

// Hand-built units of the courier scenario; only name, isGroup and mean matter to these functions.
function unit(name: string, value: number, isGroup = false): FlooredImportance {
  return { name, members: isGroup ? ['distance_km', 'stops'] : [name], isGroup, mean: value, refitSd: 0, drawSd: 0, lower: value, upper: value, isAboveFloor: value > 0, perRefit: [value] }
}
const importances = [
  unit('weight_kg', 0.1),
  unit('distance_km', 0.3),
  unit('stops', 0.1),
  unit('Zone', -0.05),
  unit('route', 0.5, true),
  unit('depot', 0.2, true),
  unit('area', 0.5, true),
]

describe('rankFeatures(importances)', () => {
  it('ranks the features only, highest mean first, ties by name', () => {
    expect(rankFeatures(importances).map((u) => u.name)).toEqual(['distance_km', 'stops', 'weight_kg', 'Zone'])
    expect(importances[0].name).toBe('weight_kg')
  })
})

describe('sideRanks(importances)', () => {
  it('ranks features among features and groups among groups, 1-based, keyed by rankKey', () => {
    expect(Object.fromEntries(sideRanks(importances))).toEqual({
      'false:distance_km': 1,
      'false:stops': 2,
      'false:weight_kg': 3,
      'false:Zone': 4,
      'true:area': 1,
      'true:route': 2,
      'true:depot': 3,
    })
    expect(rankKey({ name: 'route', isGroup: true })).toBe('true:route')
  })
})

describe('positiveShare(importances, name)', () => {
  it('is the unit\'s positive importance over the features\' positive total (groups left out of it)', () => {
    // Features' positive total 0.3 + 0.1 + 0.1 = 0.5 (Zone's −0.05 counts as 0, groups not at all).
    expect(positiveShare(importances, 'distance_km')).toBeCloseTo(0.6, 14)
    expect(positiveShare(importances, 'stops')).toBeCloseTo(0.2, 14)
    expect(positiveShare(importances, 'Zone')).toBe(0)
    // A group's share is against the same features' total: 0.5 / 0.5.
    expect(positiveShare(importances, 'route')).toBeCloseTo(1, 14)
    expect(positiveShare(importances, 'missing')).toBe(0)
  })

  it('is 0 when no feature has positive importance', () => {
    expect(positiveShare([unit('a', -0.1), unit('b', 0), unit('g', 0.4, true)], 'g')).toBe(0)
    expect(positiveShare([unit('a', 0)], 'a')).toBe(0)
  })
})

describe('mean(values)', () => {
  it('is the arithmetic mean, NaN for no values', () => {
    expect(mean([0.8, 0.82, 0.78])).toBeCloseTo(0.8, 14)
    expect(mean([])).toBeNaN()
  })
})
