import { describe, expect, it } from 'vitest'
import { checkRankShift, type RankShiftOptions } from '../../../src/core/checks/rank-shift.ts'
import { sideResult } from './side-results.ts'

// The policy defaults (src/core/config.ts) plus the fixed 30% relative change (src/core/gate-settings.ts).
const options: RankShiftOptions = { action: 'warn', falseDiscoveryRate: 0.05, minPositions: 2, minRelativeChange: 0.3 }

const steadyFeatures = {
  distance_km: [10.0, 10.2, 9.8, 10.1, 9.9],
  stop_count: [5.0, 5.1, 4.9, 5.2, 4.8],
  rain_forecast_mm: [3.0, 3.1, 2.9, 3.05, 2.95],
}

describe('checkRankShift(base, head, options)', () => {
  it('reports a significant shift that moves ranks, with Welch and Benjamini–Hochberg numbers, in these words', () => {
    const base = sideResult({ side: 'base', features: { ...steadyFeatures, roadworks_km: [1.0, 1.1, 0.9, 1.05, 0.95] } })
    const head = sideResult({ features: { ...steadyFeatures, roadworks_km: [12.0, 12.3, 11.7, 12.1, 11.9] } })
    const { findings, shifts } = checkRankShift(base, head, options)
    expect(findings).toHaveLength(1)
    // scipy.stats.ttest_ind(base, head, equal_var=False) (SciPy 1.10.1): t = −103.7089945740268,
    // p = 1.666079491235603e-09, Welch–Satterthwaite df 4.984615384615382 (by hand from the variances);
    // the other three features are identical on both sides (p = 1), so BH adjusts p to 4p = 6.664317964942412e-09.
    // Refit SDs: 0.07905694150420951 and 0.22360679774997935 (numpy.std ddof 1).
    expect(findings[0]).toMatchObject({
      kind: 'rank-shift',
      severity: 'warn',
      feature: 'roadworks_km',
      // The change is against the base value, signed: (12 − 1) / 1 = +1100%; ranks are each side's own.
      title: "roadworks_km's importance rose from 1 to 12 (+1100%; rank 4 → 1).",
      message:
        "Across 5 base and 5 head refits the change is beyond reseed noise: Welch's t = -103.7 (df 4.985), p < 1e-6, Benjamini–Hochberg adjusted p < 1e-6 against a false discovery rate of 0.05. " +
        'Reseed noise (refit SD) is 0.07906 on the base side and 0.2236 on the head.',
      evidence: { baseRank: 4, headRank: 1 },
    })
    const shift = shifts.get('roadworks_km')!
    expect(shift.welchT).toBeCloseTo(-103.7089945740268, 9)
    expect(shift.welchDf).toBeCloseTo(4.984615384615382, 9)
    expect(shift.pValue / 1.666079491235603e-9).toBeCloseTo(1, 4)
    expect(shift.adjustedPValue / 6.664317964942412e-9).toBeCloseTo(1, 4)
    expect(shift).toMatchObject({ isSignificant: true, positionsMoved: -3 })
    expect(shifts.get('distance_km')).toMatchObject({ welchT: 0, pValue: 1, adjustedPValue: 1, isSignificant: false, positionsMoved: 1 })
  })

  it('adjusts over all features with Benjamini–Hochberg: a raw p of 0.037 is a finding alone but not among four', () => {
    // scipy.stats.ttest_ind(..., equal_var=False) (SciPy 1.10.1): t = −2.5, df 8, p = 0.03694203771362403.
    const before = [1.0, 1.4, 0.6, 1.2, 0.8]
    const after = [1.5, 1.9, 1.1, 1.7, 1.3]
    const alone = checkRankShift(sideResult({ side: 'base', features: { roadworks_km: before } }), sideResult({ features: { roadworks_km: after } }), options)
    expect(alone.shifts.get('roadworks_km')!.adjustedPValue).toBeCloseTo(0.03694203771362403, 9)
    // One feature: it keeps rank 1 but changes by 0.5 / 1.5 = 33% of the larger mean (>= 30%).
    expect(alone.findings.map((f) => f.title)).toEqual(["roadworks_km's importance rose from 1 to 1.5 (+50%; still rank 1)."])

    const base = sideResult({ side: 'base', features: { ...steadyFeatures, roadworks_km: before } })
    const head = sideResult({ features: { ...steadyFeatures, roadworks_km: after } })
    const among = checkRankShift(base, head, options)
    // Benjamini & Hochberg (1995): with p-values [1, 1, 1, p] the smallest is adjusted to 4p = 0.148 > 0.05.
    expect(among.shifts.get('roadworks_km')!.pValue).toBeCloseTo(0.03694203771362403, 9)
    expect(among.shifts.get('roadworks_km')!.adjustedPValue).toBeCloseTo(4 * 0.03694203771362403, 9)
    expect(among.shifts.get('roadworks_km')!.isSignificant).toBe(false)
    expect(among.findings).toEqual([])
  })

  it('does not compare ranks among features indistinguishable from zero, however significant the change', () => {
    const noise = { parcel_weight_kg: [0.001, -0.002, 0, 0.002, -0.001], driver_shift: [-0.001, 0, 0.001, -0.002, 0.002] }
    const base = sideResult({ side: 'base', features: { ...steadyFeatures, ...noise } })
    const head = sideResult({ features: { ...steadyFeatures, ...noise, parcel_weight_kg: [-0.01, -0.011, -0.009, -0.0105, -0.0095] } })
    const { findings, shifts } = checkRankShift(base, head, options)
    expect(shifts.get('parcel_weight_kg')!.isSignificant).toBe(true)
    expect(shifts.get('parcel_weight_kg')!.positionsMoved).toBeNull()
    expect(shifts.get('driver_shift')!.positionsMoved).toBeNull()
    expect(findings).toEqual([])
  })

  it('needs both significance and a move of minPositions or minRelativeChange', () => {
    // A significant change of 4% that keeps every rank: not reported.
    const base = sideResult({ side: 'base', features: steadyFeatures })
    const head = sideResult({ features: { ...steadyFeatures, distance_km: [10.4, 10.6, 10.2, 10.5, 10.3] } })
    const { findings, shifts } = checkRankShift(base, head, options)
    expect(shifts.get('distance_km')).toMatchObject({ isSignificant: true, positionsMoved: 0 })
    expect(findings).toEqual([])
    // A top feature that halves but stays first: reported by the relative change.
    const halved = checkRankShift(base, sideResult({ features: { ...steadyFeatures, distance_km: [5.5, 5.6, 5.4, 5.55, 5.45] } }), options)
    expect(halved.findings.map((f) => f.title)).toEqual(["distance_km's importance fell from 10 to 5.5 (-45%; still rank 1)."])
    // The same with the check off: the shifts are still computed for the table, no finding.
    const off = checkRankShift(base, sideResult({ features: { ...steadyFeatures, distance_km: [5.5, 5.6, 5.4, 5.55, 5.45] } }), { ...options, action: 'off' })
    expect(off.findings).toEqual([])
    expect(off.shifts.get('distance_km')!.isSignificant).toBe(true)
  })

  it('reports, as information, a feature that fell to the noise floor, in these words', () => {
    const base = sideResult({ side: 'base', features: steadyFeatures })
    // Head refit means [0.01, −0.01, 0.02, −0.02, 0]: mean 0, s = 0.0158114, half-width
    // t(0.975, 4) · s / √5 = 0.0196324 (t = 2.7764451052: SciPy 1.10.1 scipy.stats.t.ppf(0.975, 4);
    // NIST/SEMATECH e-Handbook §1.3.6.7.2 tabulates 2.776445).
    const head = sideResult({ features: { ...steadyFeatures, stop_count: [0.01, -0.01, 0.02, -0.02, 0] } })
    const drops = checkRankShift(base, head, options).findings.filter((f) => f.kind === 'floor-drop')
    expect(drops).toEqual([
      {
        kind: 'floor-drop',
        severity: 'info',
        feature: 'stop_count',
        title: 'stop_count fell to the noise floor: importance 5 on the base side, 0 on the head (-100%).',
        message:
          "On the head side the 95% interval of stop_count's importance [-0.01963, 0.01963] does not lie above zero: the candidate model no longer measurably relies on it.",
        evidence: { baseMean: 5, headMean: 0, headLower: expect.closeTo(-0.0196324316, 9), headUpper: expect.closeTo(0.0196324316, 9) },
      },
    ])
  })

  it('says nothing of the floor when the importance rose and only its interval widened', () => {
    const base = sideResult({ side: 'base', features: { ...steadyFeatures, stop_count: [0.1, 0.11, 0.09, 0.1, 0.1] } })
    // Mean 0.2 but wide: the interval reaches below zero on the head.
    const head = sideResult({ features: { ...steadyFeatures, stop_count: [0.9, -0.5, 0.8, -0.4, 0.2] } })
    expect(checkRankShift(base, head, options).findings.filter((f) => f.kind === 'floor-drop')).toEqual([])
  })

  it('tests the per-draw values when each side has a single refit (a loaded model)', () => {
    const base = sideResult({ side: 'base', features: { distance_km: [[10, 10.2, 9.8]], stop_count: [[5, 5.1, 4.9]] } })
    const head = sideResult({ features: { distance_km: [[10, 10.2, 9.8]], stop_count: [[15, 15.3, 14.7]] } })
    const { findings, shifts } = checkRankShift(base, head, options)
    // By hand: draws [5, 5.1, 4.9] and [15, 15.3, 14.7]: s² = 0.01 and 0.09, se = sqrt(0.1 / 3), t = −10 / 0.18257 = −54.77.
    expect(shifts.get('stop_count')!.welchT).toBeCloseTo(-10 / Math.sqrt(0.1 / 3), 9)
    expect(findings[0].message.startsWith("Across 3 base and 3 head refits the change is beyond reseed noise: Welch's t = -54.77")).toBe(true)
  })

  it('leaves a unit untested, not an error, when a side has a single value (one refit of one draw)', () => {
    // Bug fixed with this test: welchTTest threw a RangeError here, so a policy with refits: 1 and
    // draws: 1 ended the whole check as an internal error (exit 3).
    const base = sideResult({ side: 'base', features: { distance_km: [[10]], stop_count: [[5]] } })
    const head = sideResult({ features: { distance_km: [[10]], stop_count: [[15]] } })
    const { findings, shifts } = checkRankShift(base, head, options)
    expect(shifts.get('stop_count')).toMatchObject({ welchT: NaN, welchDf: NaN, pValue: NaN, adjustedPValue: NaN, isSignificant: false })
    expect(findings.filter((f) => f.kind === 'rank-shift')).toEqual([])
    // Testable units are still adjusted among themselves only: here the one testable unit keeps its p.
    const mixed = checkRankShift(
      sideResult({ side: 'base', features: { distance_km: [[10, 10.2, 9.8]], stop_count: [[5]] } }),
      sideResult({ features: { distance_km: [[12, 12.2, 11.8]], stop_count: [[15]] } }),
      options,
    )
    expect(mixed.shifts.get('distance_km')!.adjustedPValue).toBe(mixed.shifts.get('distance_km')!.pValue)
  })
})
