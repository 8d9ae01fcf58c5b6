import { describe, expect, it } from 'vitest'
import { checkRankAgreement, type RankAgreementOptions } from '../../../src/core/checks/rank-agreement.ts'
import { sideResult } from './side-results.ts'

// Policy default agreement_percentile 5 (src/core/config.ts) and RBO persistence 0.9 (src/core/gate-settings.ts).
const options: RankAgreementOptions = { action: 'warn', agreementPercentile: 5, persistence: 0.9 }
const names = ['distance_km', 'stop_count', 'promised_window_h', 'rain_forecast_mm', 'depot']

/** A side whose refit r gives the features the importances rankings[r] (5 = most important). */
function ranked(side: 'base' | 'head', rankings: number[][]) {
  return sideResult({ side, features: Object.fromEntries(names.map((name, j) => [name, rankings.map((values) => values[j])])) })
}

describe('checkRankAgreement(base, head, options)', () => {
  it('flags a ranking that agrees less than the reseed null’s 5th percentile, in these words', () => {
    const base = ranked('base', [
      [5, 4, 3, 2, 1],
      [5.1, 4.1, 3.1, 2.1, 1.1],
      [4.9, 3.9, 2.9, 1.9, 0.9],
    ])
    const head = ranked('head', [
      [1, 2, 3, 4, 5],
      [1.1, 2.1, 3.1, 4.1, 5.1],
      [0.9, 1.9, 2.9, 3.9, 4.9],
    ])
    const { findings, agreement } = checkRankAgreement(base, head, options)
    // Every cross pair is a full reversal: tau-b −1, and RBO_EXT 0.737775 for abcde vs edcba, p = 0.9
    // (computed from the RBO_EXT definition of Webber, Moffat & Zobel 2010, ACM TOIS 28(4)). Within a side every pair agrees completely: the null is all ones.
    expect(agreement!.kendallTau).toBe(-1)
    expect(agreement!.rankBiasedOverlap).toBeCloseTo(0.737775, 6)
    expect(agreement!.nullKendallTau).toEqual([1, 1, 1, 1, 1, 1])
    expect([agreement!.kendallTauThreshold, agreement!.rankBiasedOverlapThreshold, agreement!.featuresCompared]).toEqual([1, 1, 5])
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'rank-agreement',
      severity: 'warn',
      title: 'The feature ranking changed more than reseeding alone changes it (Kendall tau-b -1, RBO 0.7378).',
      message:
        'Over 5 features above the noise floor, base and head refits agree with Kendall tau-b -1 and rank-biased overlap 0.7378 (RBO_EXT, p = 0.9); ' +
        'two refits with other seeds agree at least 1 and 1 in 95% of pairs.',
      evidence: { kendallTau: -1, kendallTauThreshold: 1, featuresCompared: 5, nullPairs: 6 },
    })
  })

  it('does not flag disagreement that reseeding alone produces, and gives the null percentile by interpolation', () => {
    // Base refits: the reference order, stop_count/promised_window_h swapped, rain_forecast_mm/depot swapped.
    const base = ranked('base', [
      [5, 4, 3, 2, 1],
      [5, 3, 4, 2, 1],
      [5, 4, 3, 1, 2],
    ])
    const head = ranked('head', [
      [5, 4, 3, 2, 1],
      [5, 4, 3, 2, 1],
      [5, 4, 3, 2, 1],
    ])
    const { findings, agreement } = checkRankAgreement(base, head, options)
    // By hand: one swap among 5 items gives tau-b (10 − 2) / 10 = 0.8, two swaps 0.6. Null tau-b:
    // base pairs 0.8, 0.8, 0.6 and head pairs 1, 1, 1; the 5th percentile by linear interpolation
    // (Hyndman & Fan 1996 type 7, numpy.percentile's default) of [0.6, 0.8, 0.8, 1, 1, 1] is
    // 0.6 + 0.25 · (0.8 − 0.6) = 0.65. Cross: 3 pairs at 1 and 6 at 0.8, mean 0.8667.
    expect(agreement!.nullKendallTau.map((t) => Number(t.toFixed(12)))).toEqual([0.8, 0.8, 0.6, 1, 1, 1])
    expect(agreement!.kendallTauThreshold).toBeCloseTo(0.65, 12)
    expect(agreement!.kendallTau).toBeCloseTo(2.6 / 3, 12)
    expect(findings).toEqual([])
  })

  it('compares only features above the floor on at least one side, and needs 3 of them and 2 refits per side', () => {
    const floor = [0.01, -0.01, 0]
    const side = (s: 'base' | 'head', three: number[]) =>
      sideResult({ side: s, features: { distance_km: [three[0], three[0], three[0]], stop_count: [three[1], three[1], three[1]], depot: [three[2], three[2], three[2]], parcel_weight_kg: floor } })
    const result = checkRankAgreement(side('base', [3, 2, 1]), side('head', [1, 2, 3]), options)
    expect(result.agreement!.featuresCompared).toBe(3)
    expect(checkRankAgreement(side('base', [3, 2, 0]), side('head', [1, 2, 0]), options)).toEqual({ findings: [], agreement: null })
    const single = ranked('base', [[5, 4, 3, 2, 1]])
    expect(checkRankAgreement(single, ranked('head', [[1, 2, 3, 4, 5]]), options)).toEqual({ findings: [], agreement: null })
  })

  it('computes the agreement but finds nothing when the check is off', () => {
    const base = ranked('base', [
      [5, 4, 3, 2, 1],
      [5.1, 4.1, 3.1, 2.1, 1.1],
    ])
    const head = ranked('head', [
      [1, 2, 3, 4, 5],
      [1.1, 2.1, 3.1, 4.1, 5.1],
    ])
    const { findings, agreement } = checkRankAgreement(base, head, { ...options, action: 'off' })
    expect(findings).toEqual([])
    expect(agreement!.kendallTau).toBe(-1)
  })
})
