import { describe, expect, it } from 'vitest'
import { checkRankAgreement, type RankAgreementOptions } from '../../../src/core/checks/rank-agreement.ts'
import { sideResult } from './side-results.ts'

// Which of the two statistics flags, the inclusive lines, and the features compared. Kendall's tau-b
// by hand (concordant − discordant pairs over 6 or 15 pairs, no ties); RBO_EXT values come from
// rankBiasedOverlap, tested against Webber, Moffat & Zobel (2010) in its own test.
const options: RankAgreementOptions = { action: 'warn', agreementPercentile: 5, persistence: 0.9 }

describe('checkRankAgreement: either statistic below its null percentile flags', () => {
  it('flags on Kendall tau alone: the bottom pair swapped between sides, the top pair swapped in one base refit', () => {
    // Base refits a b c d and b a c d (null tau 4/6 = 0.667 between them), head a b d c twice (null tau 1):
    // cross tau (4/6 + 2/6) / 2 = 0.5 against the null's 5th percentile 0.667 + 0.05 · 0.333 = 0.6833.
    const base = sideResult({ side: 'base', features: { a: [100, 99], b: [99, 100], c: [50, 50], d: [49, 49] } })
    const head = sideResult({ features: { a: [100, 100], b: [99, 99], c: [49, 49], d: [50, 50] } })
    const { findings, agreement } = checkRankAgreement(base, head, options)
    expect(agreement!.kendallTau).toBeCloseTo(0.5, 12)
    expect(agreement!.kendallTauThreshold).toBeCloseTo(0.6833333333333333, 12)
    expect(agreement!.rankBiasedOverlap).toBeGreaterThan(agreement!.rankBiasedOverlapThreshold)
    expect(findings.map((f) => f.kind)).toEqual(['rank-agreement'])
  })

  it('flags on RBO alone: the top pair swapped between sides, the bottom reversed in one base refit', () => {
    // Six features. Base refits a b c d e f and a b c f e d (null tau (12 − 3) / 15 = 0.6), head b a c d e f:
    // cross tau (13/15 + 7/15) / 2 = 0.667, above the null's 0.6 + 0.05 · 0.4 = 0.62; RBO, which weighs the
    // top, is below its null percentile.
    const base = sideResult({ side: 'base', features: { a: [100, 100], b: [90, 90], c: [80, 80], d: [70, 50], e: [60, 60], f: [50, 70] } })
    const head = sideResult({ features: { a: [90, 90], b: [100, 100], c: [80, 80], d: [70, 70], e: [60, 60], f: [50, 50] } })
    const { findings, agreement } = checkRankAgreement(base, head, options)
    expect(agreement!.kendallTau).toBeCloseTo(2 / 3, 12)
    expect(agreement!.kendallTauThreshold).toBeCloseTo(0.62, 12)
    expect(agreement!.rankBiasedOverlap).toBeLessThan(agreement!.rankBiasedOverlapThreshold)
    expect(findings.map((f) => f.kind)).toEqual(['rank-agreement'])
  })

  it('does not flag agreement equal to the null (the lines are strict)', () => {
    const same = { a: [3, 3], b: [2, 2], c: [1, 1] }
    const { findings, agreement } = checkRankAgreement(sideResult({ side: 'base', features: same }), sideResult({ features: same }), options)
    expect(agreement).toMatchObject({ kendallTau: 1, kendallTauThreshold: 1, rankBiasedOverlap: 1, rankBiasedOverlapThreshold: 1 })
    expect(findings).toEqual([])
  })

  it('leaves undefined tau values (a refit with all compared importances tied) out of the means and the null', () => {
    const base = sideResult({ side: 'base', features: { a: [10, 10], b: [10, 9], c: [10, 8] } })
    const head = sideResult({ features: { a: [10, 10], b: [9, 9], c: [8, 8] } })
    const { agreement, findings } = checkRankAgreement(base, head, options)
    expect(agreement!.nullKendallTau[0]).toBeNaN()
    expect(agreement!.nullKendallTau[1]).toBe(1)
    expect(agreement!.kendallTau).toBe(1)
    expect(agreement!.kendallTauThreshold).toBe(1)
    expect(findings).toEqual([])
  })
})

describe('checkRankAgreement: what is compared', () => {
  const base = sideResult({ side: 'base', features: { a: [3, 3.1], b: [2, 2.1], c: [1, 1.1] }, groups: { g: { members: ['a', 'b'], values: [5, 5] } } })

  it('leaves out groups and features only the head has', () => {
    const head = sideResult({ features: { a: [3, 3.1], b: [2, 2.1], c: [1, 1.1], new_scan: [9, 9] }, groups: { g: { members: ['a', 'b'], values: [5, 5] } } })
    expect(checkRankAgreement(base, head, options).agreement!.featuresCompared).toBe(3)
  })

  it('needs two refits on each side', () => {
    const one = sideResult({ features: { a: [3], b: [2], c: [1] } })
    expect(checkRankAgreement(base, one, options)).toEqual({ findings: [], agreement: null })
    expect(checkRankAgreement(sideResult({ side: 'base', features: { a: [3], b: [2], c: [1] } }), base, options)).toEqual({ findings: [], agreement: null })
  })
})
