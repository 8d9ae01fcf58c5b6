import { describe, expect, it } from 'vitest'
import { checkSensitivity, type SensitivitySample } from '../../../src/core/checks/sensitivity-change.ts'
import { defaultChecks } from '../../../src/core/policy/policy-defaults.ts'

const options = defaultChecks.sensitivity
const unit = (name: string, samples: number[], flipShare?: number): SensitivitySample => ({
  name,
  isGroup: false,
  mean: samples.reduce((s, v) => s + v, 0) / samples.length,
  samples,
  ...(flipShare !== undefined ? { flipShare } : {}),
})

describe('checkSensitivity: base against head', () => {
  it("tests each feature with Welch's t-test: x = 1..5 against y = 2, 4, .., 10 gives p = 0.10753 (SciPy, computed), not significant", () => {
    const base = { holdout: [unit('distance_km', [1, 2, 3, 4, 5]), unit('depot', [9, 9.1, 9.2, 9.1, 9])] }
    const head = { holdout: [unit('distance_km', [2, 4, 6, 8, 10]), unit('depot', [9, 9.1, 9.2, 9.1, 9])] }
    const { findings, changes } = checkSensitivity(base, head, options)
    // /work/shared check values: Welch test x = 1..5, y = 2..10 (the even numbers: t = −1.8973665961010275, ν = 5.882352941176471): two-sided p = 0.10753119493062728 (scipy.stats.ttest_ind, equal_var=False).
    expect(changes.get('distance_km')!.pValue).toBeCloseTo(0.10753119493062728, 12)
    expect(findings.filter((f) => f.feature === 'distance_km')).toEqual([])
  })

  it('reports a significant change of at least 20% of the larger value, warn by default, and not a hair-thin one', () => {
    const base = { holdout: [unit('stop_count', [0.3, 0.31, 0.29], 0.2), unit('rain_mm', [0.001, 0.0011, 0.0009])] }
    const head = { holdout: [unit('stop_count', [0.1, 0.11, 0.09], 0.05), unit('rain_mm', [0.01, 0.0101, 0.0099])] }
    const { findings } = checkSensitivity(base, head, options)
    // rain_mm's change is significant and tenfold, but 0.01 is below 5% of the largest feature's 0.3 (min_share).
    expect(findings.map((f) => [f.kind, f.severity, f.feature])).toEqual([['sensitivity-shift', 'warn', 'stop_count']])
    expect(findings[0].title).toBe('How much stop_count moves the predictions fell: from 0.3 to 0.1 (-67%).')
    expect(findings[0].evidence).toMatchObject({ baseFlipShare: 0.2, headFlipShare: 0.05 })
    expect(checkSensitivity(base, head, { ...options, action: 'off' }).findings).toEqual([])
  })
})

describe('checkSensitivity: unlabeled rows against the holdout', () => {
  it('flags a feature at twice its holdout value when the paired interval excludes 0; the interval is the tabled one', () => {
    // Paired differences [0.10, 0.12, 0.08, 0.11, 0.09]: mean 0.1, 95% half-width 0.0196324316 (t = 2.7764451052,
    // s = 0.0158113883; computed with SciPy, /work/shared check values).
    const holdout = [unit('roadworks_km', [0.1, 0.1, 0.1, 0.1, 0.1]), unit('depot', [0.2, 0.21, 0.19, 0.2, 0.2])]
    const unlabeled = [unit('roadworks_km', [0.2, 0.22, 0.18, 0.21, 0.19]), unit('depot', [0.25, 0.26, 0.24, 0.25, 0.25])]
    const { findings } = checkSensitivity(undefined, { holdout, unlabeled }, options)
    expect(findings).toHaveLength(1) // depot: ratio 1.25, below 2
    expect(findings[0].kind).toBe('sensitivity-unlabeled')
    expect(findings[0].feature).toBe('roadworks_km')
    expect(findings[0].evidence.ratio).toBeCloseTo(2, 12)
    expect(findings[0].evidence.differenceLower).toBeCloseTo(0.1 - 0.0196324316, 9)
    expect(findings[0].evidence.differenceUpper).toBeCloseTo(0.1 + 0.0196324316, 9)
    expect(findings[0].title).toBe('On the unlabeled rows roadworks_km moves the candidate\'s predictions more than on the holdout (0.2 against 0.1).')
  })

  it('does not flag a large ratio whose paired interval covers zero', () => {
    const holdout = [unit('x', [0.1, 0.1, 0.1])]
    const unlabeled = [unit('x', [0.0, 0.6, 0.0])]
    expect(checkSensitivity(undefined, { holdout, unlabeled }, options).findings).toEqual([])
  })
})
