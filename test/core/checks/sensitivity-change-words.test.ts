import { describe, expect, it } from 'vitest'
import { checkSensitivity, type SensitivitySample } from '../../../src/core/checks/sensitivity-change.ts'
import { defaultChecks } from '../../../src/core/policy/policy-defaults.ts'

// The sensitivity findings in their words and at their lines. Welch and t-interval values from
// scipy.stats.ttest_ind(equal_var=False) and scipy.stats.t.interval, SciPy 1.10.1.
const options = defaultChecks.sensitivity
const unit = (name: string, samples: number[], extra: Partial<SensitivitySample> = {}): SensitivitySample => ({
  name,
  isGroup: false,
  mean: samples.reduce((s, v) => s + v, 0) / samples.length,
  samples,
  ...extra,
})

describe('checkSensitivity: a shift between base and head, in these words', () => {
  const base = { holdout: [unit('stop_count', [0.1, 0.11, 0.09])] }
  const head = { holdout: [unit('stop_count', [0.3, 0.31, 0.29])] }

  it('says the sensitivity rose, with the Welch test: t = −24.494897427831763, p = 1.6483088987181272e-05', () => {
    const { findings, changes } = checkSensitivity(base, head, options)
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'sensitivity-shift',
      severity: 'warn',
      feature: 'stop_count',
      title: 'How much stop_count moves the predictions rose: from 0.1 to 0.3 (+200%).',
      message:
        "Mean absolute change of the model's output when stop_count takes reference values, on the holdout: 0.1 on the base side, 0.3 on the head. " +
        "Over 3 and 3 values, Welch's t = -24.49 (df 4), p = 1.648e-5, Benjamini–Hochberg adjusted p = 1.648e-5 against a false discovery rate of 0.05. " +
        'This needs no labels: it is what the model does, not how well.',
    })
    expect(findings[0].evidence).not.toHaveProperty('baseFlipShare')
    expect(findings[0].evidence).not.toHaveProperty('headFlipShare')
    expect(findings[0].evidence.welchT as number).toBeCloseTo(-24.494897427831763, 9)
    expect(findings[0].evidence.relativeChange as number).toBeCloseTo(2 / 3, 12)
    const change = changes.get('stop_count')!
    expect(change.pValue / 1.6483088987181272e-5).toBeCloseTo(1, 5)
    expect(change).toMatchObject({ isSignificant: true })
    expect(change.adjustedPValue).toBe(change.pValue)
  })

  it('draws the false-discovery and relative-change lines inclusively', () => {
    const p = checkSensitivity(base, head, options).changes.get('stop_count')!.pValue
    expect(checkSensitivity(base, head, { ...options, falseDiscoveryRate: p }).findings).toHaveLength(1)
    const below = checkSensitivity(base, head, { ...options, falseDiscoveryRate: p * 0.99 })
    expect(below.findings).toEqual([])
    expect(below.changes.get('stop_count')!.isSignificant).toBe(false)
    // Relative change (0.3 − 0.1) / 0.3 = 2/3 (as the means round).
    const relative = checkSensitivity(base, head, options).findings[0].evidence.relativeChange as number
    expect(relative).toBeCloseTo(2 / 3, 12)
    expect(checkSensitivity(base, head, { ...options, minRelativeChange: relative }).findings).toHaveLength(1)
    expect(checkSensitivity(base, head, { ...options, minRelativeChange: 0.67 }).findings).toEqual([])
  })

  it('pairs units by kind and name, and tests only units with two values on each side', () => {
    const group = (name: string, samples: number[]) => unit(name, samples, { isGroup: true })
    const b = { holdout: [group('stop_count', [0.1, 0.11, 0.09]), unit('depot', [0.2]), unit('distance_km', [0.5, 0.51, 0.49])] }
    const h = { holdout: [unit('stop_count', [0.3, 0.31, 0.29]), unit('depot', [0.6, 0.61]), unit('distance_km', [0.5])] }
    const { findings, changes } = checkSensitivity(b, h, options)
    expect(findings).toEqual([])
    expect(changes.size).toBe(0)
  })

  it('measures the share floor against the larger side\'s largest feature, groups left out', () => {
    // The base's largest feature is 10: stop_count's 0.3 is 3% of it, below min_share 5%. A group of
    // 100 on the head does not count towards the largest value.
    const big = { holdout: [...base.holdout, unit('distance_km', [10, 10.1, 9.9])] }
    const headBig = { holdout: [...head.holdout, unit('distance_km', [10, 10.1, 9.9]), unit('route', [100, 100, 100], { isGroup: true })] }
    expect(checkSensitivity(big, headBig, options).findings).toEqual([])
    expect(checkSensitivity(big, headBig, { ...options, minShare: 0.03 }).findings.map((f) => f.feature)).toEqual(['stop_count'])
    const groupOnly = { holdout: [...head.holdout, unit('route', [100, 100.1, 99.9], { isGroup: true })] }
    const baseGroup = { holdout: [...base.holdout, unit('route', [100, 100.1, 99.9], { isGroup: true })] }
    expect(checkSensitivity(baseGroup, groupOnly, options).findings.map((f) => f.feature)).toEqual(['stop_count'])
  })

  it('says nothing about a unit that never moves the predictions', () => {
    const zero = { holdout: [unit('stop_count', [0, 0, 0])] }
    const negative = { holdout: [unit('stop_count', [-0.2, -0.21, -0.19])] }
    expect(checkSensitivity(zero, negative, { ...options, minShare: 0 }).findings).toEqual([])
  })

  it('keeps each side\'s flip share in the evidence', () => {
    const b = { holdout: [unit('stop_count', [0.1, 0.11, 0.09], { flipShare: 0.02 })] }
    const h = { holdout: [unit('stop_count', [0.3, 0.31, 0.29], { flipShare: 0.07 })] }
    expect(checkSensitivity(b, h, options).findings[0].evidence).toMatchObject({ baseFlipShare: 0.02, headFlipShare: 0.07 })
  })
})

describe('checkSensitivity: unlabeled rows against the holdout, in these words', () => {
  const holdout = [unit('roadworks_km', [0.1, 0.1, 0.1, 0.1, 0.1], { flipShare: 0.01 })]

  it('says the model leans less on a feature at half its holdout value: interval −0.05878 to −0.04122', () => {
    const unlabeled = [unit('roadworks_km', [0.05, 0.06, 0.04, 0.05, 0.05], { flipShare: 0.004 })]
    const { findings } = checkSensitivity(undefined, { holdout, unlabeled }, options)
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'sensitivity-unlabeled',
      severity: 'warn',
      feature: 'roadworks_km',
      title: "On the unlabeled rows roadworks_km moves the candidate's predictions less than on the holdout (0.05 against 0.1).",
      message:
        "Mean absolute change of the head model's output when roadworks_km takes reference values: 0.05 on data.unlabeled, 0.1 on the holdout " +
        "(ratio 0.5; the paired difference's 95% interval is [-0.05878, -0.04122] over 5 values). " +
        'The inputs the model meets now differ from those it was judged on, so the holdout score may not describe them.',
      evidence: { unlabeledFlipShare: 0.004, holdoutFlipShare: 0.01 },
    })
    expect(findings[0].evidence.differenceLower as number).toBeCloseTo(-0.05877989033085085, 10)
    expect(findings[0].evidence.differenceUpper as number).toBeCloseTo(-0.04122010966914916, 10)
    expect(findings[0].evidence.ratio as number).toBeCloseTo(0.5, 12)
  })

  it('draws the ratio line inclusively on both sides', () => {
    const run = (samples: number[], ratio: number) => checkSensitivity(undefined, { holdout, unlabeled: [unit('roadworks_km', samples)] }, { ...options, unlabeledRatio: ratio }).findings
    // Mean 0.25 against 0.1: ratio 2.5 (as the means round); a line just above it says nothing.
    const up = [0.25, 0.26, 0.24, 0.25, 0.25]
    const upRatio = run(up, 2)[0].evidence.ratio as number
    expect(upRatio).toBeCloseTo(2.5, 12)
    expect(run(up, upRatio)).toHaveLength(1)
    expect(run(up, 2.6)).toEqual([])
    // Mean 0.04 against 0.1: ratio 0.4, at the line 1 / 2.5; a line of 2.6 (1 / 2.6 = 0.385) says nothing.
    const down = [0.04, 0.05, 0.03, 0.04, 0.04]
    const downRatio = run(down, 2)[0].evidence.ratio as number
    expect(downRatio).toBeCloseTo(0.4, 12)
    expect(run(down, 1 / downRatio)).toHaveLength(1)
    expect(run(down, 2.6)).toEqual([])
  })

  it('gives no ratio for a feature the holdout never moved', () => {
    const still = [unit('roadworks_km', [0, 0, 0, 0, 0])]
    const unlabeled = [unit('roadworks_km', [0.2, 0.22, 0.18, 0.21, 0.19])]
    const [finding] = checkSensitivity(undefined, { holdout: still, unlabeled }, options).findings
    expect(finding.evidence.ratio).toBeNull()
    expect(finding.message).toContain('(ratio inf;')
  })

  it('needs paired values of the same length, two at least, and a value above the share floor', () => {
    const more = [0.2, 0.22, 0.18, 0.21, 0.19]
    expect(checkSensitivity(undefined, { holdout, unlabeled: [unit('roadworks_km', more.slice(0, 4))] }, options).findings).toEqual([])
    const one = [unit('roadworks_km', [0.1])]
    expect(checkSensitivity(undefined, { holdout: one, unlabeled: [unit('roadworks_km', [0.3])] }, options).findings).toEqual([])
    // Beside a feature of 10 on the holdout, 0.2 is 2% of it: below min_share 5%.
    const withBig = [...holdout, unit('distance_km', [10, 10, 10, 10, 10])]
    const unlabeled = [unit('roadworks_km', more), unit('distance_km', [10, 10, 10, 10, 10])]
    expect(checkSensitivity(undefined, { holdout: withBig, unlabeled }, options).findings).toEqual([])
    expect(checkSensitivity(undefined, { holdout: withBig, unlabeled }, { ...options, minShare: 0.02 }).findings.map((f) => f.feature)).toEqual(['roadworks_km'])
    // Never moved on either: nothing.
    const zeros = [unit('roadworks_km', [0, 0, 0])]
    expect(checkSensitivity(undefined, { holdout: zeros, unlabeled: zeros }, { ...options, minShare: 0 }).findings).toEqual([])
  })
})
