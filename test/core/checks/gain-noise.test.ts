import { describe, expect, it } from 'vitest'
import { checkGainNoise, looksLikeIdentifier, type GainFeature } from '../../../src/core/checks/gain-noise.ts'
import { defaultChecks } from '../../../src/core/policy/policy-defaults.ts'

const feature = (name: string, gain: number, distinct: number, isAboveFloor: boolean, idLike = true): GainFeature => ({ name, gain, splits: 10, distinct, idLike, importance: isAboveFloor ? 0.05 : 0.0001, isAboveFloor })

describe('checkGainNoise (Strobl, Boulesteix, Zeileis & Hothorn 2007: gain favours many distinct values)', () => {
  const features = [
    feature('parcel_code', 50, 4000, false), // top by gain, many values, nothing on the holdout
    feature('distance_km', 30, 900, true), // top by gain and real on the holdout
    feature('fragile', 15, 2, false), // two values: not high cardinality
    feature('depot', 5, 5, true),
  ]

  it('warns for a new or changed high-cardinality feature ranked high by gain and at zero on the holdout', () => {
    const findings = checkGainNoise(features, new Set(['parcel_code']), defaultChecks.gain)
    expect(findings.map((f) => [f.kind, f.severity, f.feature])).toEqual([['gain-noise', 'warn', 'parcel_code']])
    expect(findings[0].title).toBe(
      "parcel_code ranks 1 by the trees' gain (50%) but is indistinguishable from zero on the holdout: it fits noise in training (an identifier?).",
    )
    expect(findings[0].evidence).toMatchObject({ gainRank: 1, gainShare: 0.5, distinct: 4000 })
  })

  it('reports it as info when the pull request did not touch the feature, and not at all when off', () => {
    expect(checkGainNoise(features, new Set(), defaultChecks.gain).map((f) => f.severity)).toEqual(['info'])
    expect(checkGainNoise(features, new Set(['parcel_code']), { ...defaultChecks.gain, action: 'off' })).toEqual([])
  })

  it('leaves out features beyond the top ranks or below the gain share', () => {
    expect(checkGainNoise(features, new Set(['parcel_code']), { ...defaultChecks.gain, minGainShare: 0.6 })).toEqual([])
    const later = [feature('a', 50, 10, true), feature('b', 40, 10, true), feature('c', 30, 10, true), feature('noise', 29, 500, false)]
    expect(checkGainNoise(later, new Set(['noise']), defaultChecks.gain)).toEqual([])
  })

  it('speaks of an identifier only when the column looks like one; a continuous measurement is told of fitted noise', () => {
    const measured = [feature('distance_km', 50, 4000, false, false), feature('depot', 30, 5, true)]
    const [finding] = checkGainNoise(measured, new Set(), defaultChecks.gain)
    expect(finding.title).toBe("distance_km ranks 1 by the trees' gain (62.5%) but is indistinguishable from zero on the holdout: the trees fit training noise with it.")
    expect(finding.title).not.toContain('identifier')
    expect(finding.message).not.toContain('role id')
    expect(finding.evidence).toMatchObject({ idLike: false })
  })
})

describe('looksLikeIdentifier (common practice, not a published rule)', () => {
  const range = (n: number, f: (i: number) => number) => Float64Array.from({ length: n }, (_, i) => f(i))
  it('flags whole-number columns distinct in at least 90% of present rows, and categorical ones at least half distinct', () => {
    expect(looksLikeIdentifier('numeric', range(100, (i) => 1000 + i))).toBe(true) // a row counter
    expect(looksLikeIdentifier('numeric', range(100, (i) => (i < 90 ? i : 0)))).toBe(true) // 91 distinct of 100
    expect(looksLikeIdentifier('numeric', range(100, (i) => (i < 88 ? i : 0)))).toBe(false) // 89 distinct of 100
    expect(looksLikeIdentifier('numeric', range(100, (i) => i + 0.5))).toBe(false) // a measurement
    expect(looksLikeIdentifier('numeric', range(100, (i) => (i % 10 === 0 ? NaN : i)))).toBe(true) // missing values are not counted
    expect(looksLikeIdentifier('categorical', range(100, (i) => i % 50))).toBe(true) // 50 of 100
    expect(looksLikeIdentifier('categorical', range(100, (i) => i % 49))).toBe(false)
    expect(looksLikeIdentifier('numeric', range(3, () => NaN))).toBe(false)
  })
})

describe('checkGainNoise: the words and the lines', () => {
  const feature = (name: string, gain: number, distinct: number, isAboveFloor: boolean, idLike: boolean): GainFeature => ({
    name,
    gain,
    splits: 12.5,
    distinct,
    idLike,
    importance: isAboveFloor ? 0.05 : 0.0002,
    isAboveFloor,
  })
  const facts =
    "parcel_code has 4000 distinct values in the training rows and takes 50% of the ensemble's split gain (12.5 splits per model on average), " +
    'yet replacing it on the holdout changes the score by 0.0002, within reseed noise of zero. Gain is measured on the training rows and favours ' +
    'features with many distinct values (Strobl et al. 2007)'

  it('asks whether an identifier-like column identifies rows, in these words', () => {
    const findings = checkGainNoise([feature('parcel_code', 50, 4000, false, true), feature('distance_km', 50, 900, true, false)], new Set(['parcel_code']), defaultChecks.gain)
    expect(findings).toEqual([
      {
        kind: 'gain-noise',
        severity: 'warn',
        feature: 'parcel_code',
        title: "parcel_code ranks 2 by the trees' gain (50%) but is indistinguishable from zero on the holdout: it fits noise in training (an identifier?).",
        message:
          `${facts}; its values are nearly all different, as an identifier's or a record time's are: if this column identifies rows or ` +
          'encodes when or where a row was recorded, drop it or give it the role id.',
        evidence: { gainRank: 2, gainShare: 0.5, splits: 12.5, distinct: 4000, idLike: true, importance: 0.0002, touched: true },
      },
    ])
  })

  it('tells of fitted noise for a measurement, in these words', () => {
    const [finding] = checkGainNoise([feature('parcel_code', 50, 4000, false, false), feature('depot', 50, 5, true, false)], new Set(), defaultChecks.gain)
    expect(finding.message).toBe(
      `${facts}; a measurement with many values offers many split points, so the trees can fit noise in it without it helping ` +
        'on new rows. Stronger regularisation (fewer bins, larger leaves) or leaving it out would cost nothing on this holdout.',
    )
    expect(finding.severity).toBe('info')
  })

  it('draws the gain-share and distinct-value lines inclusively, counts negative gain as none, and needs a positive total', () => {
    // 10 of 100 (the negative gain adds nothing): exactly min_gain_share 0.1, with exactly min_distinct 10 values.
    const atLines = [feature('a', 90, 10, true, false), feature('code', 10, 10, false, true), feature('b', -5, 10, true, false)]
    expect(checkGainNoise(atLines, new Set(), defaultChecks.gain).map((f) => f.feature)).toEqual(['code'])
    expect(checkGainNoise([feature('a', 90, 10, true, false), feature('code', 10, 9, false, true)], new Set(), defaultChecks.gain)).toEqual([])
    expect(checkGainNoise([feature('code', 0, 100, false, true), feature('b', -1, 100, false, true)], new Set(), defaultChecks.gain)).toEqual([])
    expect(checkGainNoise([], new Set(), defaultChecks.gain)).toEqual([])
  })
})
