import { describe, expect, it } from 'vitest'
import { checkRankShift, type RankShiftOptions } from '../../../src/core/checks/rank-shift.ts'
import { sideResult } from './side-results.ts'

// The edges of the rank-shift rule on hand-built sides (values by hand; Welch p from
// scipy.stats.ttest_ind(equal_var=False), SciPy 1.10.1, where a number is checked).
const options: RankShiftOptions = { action: 'warn', falseDiscoveryRate: 0.05, minPositions: 2, minRelativeChange: 0.3 }
const steady = { distance_km: [10.0, 10.2, 9.8, 10.1, 9.9], stop_count: [5.0, 5.1, 4.9, 5.2, 4.8] }

describe('checkRankShift: which units are paired and tested', () => {
  it('pairs a feature only with the feature of that name, not with a group of that name', () => {
    const base = sideResult({ side: 'base', features: steady, groups: { depot: { members: ['distance_km', 'stop_count'], values: [1, 1.1, 0.9, 1, 1] } } })
    const head = sideResult({ features: { ...steady, depot: [9, 9.1, 8.9, 9, 9] } })
    const { shifts, findings } = checkRankShift(base, head, options)
    expect([...shifts.keys()]).toEqual(['distance_km', 'stop_count'])
    expect(findings).toEqual([])
  })

  it('tests one refit by its draws, and gives a single value no test at all', () => {
    // One refit with five draws a side: the draws are the samples. distance_km 1..5 against 11..15:
    // t = −10 with df 8, p = 8.4881815276285e-06 (scipy.stats.ttest_ind, SciPy 1.10.1).
    const base = sideResult({ side: 'base', features: { distance_km: [[1, 2, 3, 4, 5]], stop_count: [[10, 10, 10, 10, 10]] } })
    const head = sideResult({ features: { distance_km: [[11, 12, 13, 14, 15]], stop_count: [[10, 10, 10, 10, 10]] } })
    const shift = checkRankShift(base, head, options).shifts.get('distance_km')!
    expect(shift.welchT).toBeCloseTo(-10, 10)
    expect(shift.welchDf).toBeCloseTo(8, 10)
    expect(shift.pValue / 8.4881815276285e-6).toBeCloseTo(1, 4)
    // A single draw on one side: NaN test, not significant, nothing reported.
    const single = sideResult({ side: 'base', features: { distance_km: [[1]], stop_count: [[10]] } })
    const untested = checkRankShift(single, head, options)
    expect(untested.shifts.get('distance_km')).toMatchObject({ isSignificant: false })
    expect(untested.shifts.get('distance_km')!.pValue).toBeNaN()
    expect(untested.shifts.get('distance_km')!.adjustedPValue).toBeNaN()
    expect(untested.findings).toEqual([])
    expect(checkRankShift(head, single, options).shifts.get('distance_km')!.pValue).toBeNaN()
  })

  it('reads per-refit means from two refits on, not the first refit\'s draws', () => {
    // Two refits of three draws: the refit means are 1 and 1.2 against 5 and 5.2.
    const base = sideResult({ side: 'base', features: { distance_km: [[0.9, 1, 1.1], [1.1, 1.2, 1.3]], stop_count: [[3, 3, 3], [3, 3, 3]] } })
    const head = sideResult({ features: { distance_km: [[4.9, 5, 5.1], [5.1, 5.2, 5.3]], stop_count: [[3, 3, 3], [3, 3, 3]] } })
    const { findings } = checkRankShift(base, head, { ...options, falseDiscoveryRate: 0.2 })
    expect(findings[0].message).toMatch(/^Across 2 base and 2 head refits /)
  })
})

describe('checkRankShift: the lines', () => {
  it('compares a feature that is above the floor on the head only', () => {
    // stop_count: base at the floor (wide spread around 0.5), head well above it.
    const base = sideResult({ side: 'base', features: { distance_km: steady.distance_km, stop_count: [0.5, 3, -2, 2, -1] } })
    const head = sideResult({ features: { distance_km: steady.distance_km, stop_count: [20, 20.1, 19.9, 20, 20] } })
    expect(base.importances[1].isAboveFloor).toBe(false)
    const shift = checkRankShift(base, head, options).shifts.get('stop_count')!
    expect(shift.positionsMoved).toBe(-1)
    expect(checkRankShift(base, head, options).findings.map((f) => f.kind)).toEqual(['rank-shift'])
  })

  it('measures the relative change against the larger absolute mean', () => {
    // −0.2 → 0.4: difference 0.6 over the larger |mean| 0.4 = 1.5 (over the smaller it would be 3).
    const base = sideResult({ side: 'base', features: { distance_km: steady.distance_km, stop_count: [-0.2, -0.21, -0.19, -0.2, -0.2] } })
    const head = sideResult({ features: { distance_km: steady.distance_km, stop_count: [0.4, 0.41, 0.39, 0.4, 0.4] } })
    const [finding] = checkRankShift(base, head, options).findings
    expect(finding.evidence.relativeChange as number).toBeCloseTo(1.5, 10)
    // Both means zero: no relative change, and nothing to report.
    const zero = sideResult({ features: { distance_km: steady.distance_km, stop_count: [0, 0, 0, 0, 0] } })
    expect(checkRankShift(zero, zero, options).findings).toEqual([])
  })

  it('counts an adjusted p equal to the false discovery rate, and a change of exactly minRelativeChange or minPositions', () => {
    // stop_count 5 → 3.5 (relative change 0.3), still rank 2.
    const base = sideResult({ side: 'base', features: steady })
    const head = sideResult({ features: { distance_km: steady.distance_km, stop_count: [3.5, 3.6, 3.4, 3.7, 3.3] } })
    const first = checkRankShift(base, head, options)
    const shift = first.shifts.get('stop_count')!
    const relative = first.findings[0].evidence.relativeChange as number
    expect(relative).toBeCloseTo(0.3, 12)
    expect(checkRankShift(base, head, { ...options, falseDiscoveryRate: shift.adjustedPValue }).findings).toHaveLength(1)
    expect(checkRankShift(base, head, { ...options, falseDiscoveryRate: shift.adjustedPValue * 0.999 }).findings).toEqual([])
    expect(checkRankShift(base, head, { ...options, minRelativeChange: relative }).findings).toHaveLength(1)
    expect(checkRankShift(base, head, { ...options, minRelativeChange: relative + 1e-9 }).findings).toEqual([])
    // Moving two places among compared features, with a relative change below the line: reported at minPositions 2, not 3.
    const three = { ...steady, rain_mm: [4, 4.1, 3.9, 4, 4] }
    const b3 = sideResult({ side: 'base', features: three })
    const h3 = sideResult({ features: { ...three, rain_mm: [11, 11.1, 10.9, 11, 11] } })
    expect(checkRankShift(b3, h3, { ...options, minRelativeChange: 0.9 }).findings.map((f) => f.feature)).toEqual(['rain_mm'])
    expect(checkRankShift(b3, h3, { ...options, minRelativeChange: 0.9, minPositions: 3 }).findings).toEqual([])
  })

  it('calls a fall to the floor only a fall: a head at the floor with the same mean is not one', () => {
    // Base 0.5 every refit (above the floor); head −1.5, 0.5, 2.5: the same mean 0.5, at the floor.
    const base = sideResult({ side: 'base', features: { distance_km: [10, 10, 10], stop_count: [0.5, 0.5, 0.5] } })
    const head = sideResult({ features: { distance_km: [10, 10, 10], stop_count: [-1.5, 0.5, 2.5] } })
    expect(head.importances[1]).toMatchObject({ mean: 0.5, isAboveFloor: false })
    expect(checkRankShift(base, head, options).findings).toEqual([])
  })

  it('says "fell" for a fall and "still rank" when the rank is kept', () => {
    const base = sideResult({ side: 'base', features: steady })
    const head = sideResult({ features: { distance_km: [5.5, 5.6, 5.4, 5.5, 5.5], stop_count: steady.stop_count } })
    const [finding] = checkRankShift(base, head, options).findings
    expect(finding.title).toBe("distance_km's importance fell from 10 to 5.5 (-45%; still rank 1).")
  })
})
