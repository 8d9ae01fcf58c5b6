import { describe, expect, it } from 'vitest'
import type { SideResult } from '../../../src/core/checks/side-result.ts'
import { dropColumnImportance } from '../../../src/core/importance/drop-column-importance.ts'
import { baseFeatures, check, options } from './leakage-context.ts'
import { sideResult, steady } from './side-results.ts'

// The leak rule's words and edges, finding by finding (the rules themselves: docs/leak-rule.md and
// leakage.test.ts). The policy defaults, as in leakage.test.ts.
const unevaluatedTail =
  'A feature that encodes the label cannot be told from a harmless one on this holdout, so this check neither passes nor clears the pull request. ' +
  'Give the holdout rows of both classes (or varied target values), then rerun; or set checks.leakage.action to warn if you accept not checking for leaks.'

describe('checkLeakage: a holdout that cannot show a leak, in these words', () => {
  const base = sideResult({ side: 'base', features: baseFeatures, separation: steady(0.5, 0.01) })

  it('names at most five one-feature models and counts the rest, for a constant regression target', () => {
    const single = Object.fromEntries(['f7', 'f2', 'f3', 'f1', 'f5', 'f6', 'f4'].map((n) => [n, NaN]))
    const head = sideResult({ features: baseFeatures, separation: steady(0.5, 0.01), single: { ...single, distance_km: 0.7 } })
    expect(check(base, head, {}, { task: 'regression' })).toEqual([
      {
        kind: 'leakage',
        severity: 'block',
        title: 'The leakage check could not be evaluated on the head side: the holdout target is constant, so R² is undefined.',
        message: `No holdout R² could be computed for the one-feature models of f1, f2, f3, f4, f5 and 2 more. ${unevaluatedTail}`,
        evidence: { unevaluatedFeatures: 7, fullModelUndefined: false },
      },
    ])
    const five = sideResult({ features: baseFeatures, separation: steady(0.5, 0.01), single: { f1: NaN, f2: NaN, f3: NaN, f4: NaN, f5: NaN } })
    expect(check(base, five, {}, { task: 'regression' })[0].message).toBe(`No holdout R² could be computed for the one-feature models of f1, f2, f3, f4, f5. ${unevaluatedTail}`)
  })

  it('names the full model alone when only it is undefined, and only when every refit is', () => {
    const head = sideResult({ features: baseFeatures, separation: steady(NaN, 0), single: { distance_km: 0.7 } })
    expect(check(base, head, {}, { task: 'regression', action: 'warn' })).toEqual([
      {
        kind: 'leakage',
        severity: 'warn',
        title: 'The leakage check could not be evaluated on the head side: the holdout target is constant, so R² is undefined.',
        message: `No holdout R² could be computed for the full model. ${unevaluatedTail}`,
        evidence: { unevaluatedFeatures: 0, fullModelUndefined: true },
      },
    ])
    // One refit with a defined R², or no separation recorded at all: not unevaluated.
    const partly = sideResult({ features: baseFeatures, separation: [NaN, 0.6, NaN, NaN, NaN], single: { distance_km: 0.7 } })
    expect(check(base, partly, {}, { task: 'regression' })).toEqual([])
    const unrecorded = { ...sideResult({ features: baseFeatures, single: { distance_km: 0.7 } }), separation: [] }
    expect(check(base, unrecorded, {}, { task: 'regression' })).toEqual([])
  })
})

describe('checkLeakage: a feature that alone separates one slice, in these words', () => {
  const slice = { column: 'depot', value: 'harbour', rows: 120, separation: 0.995, besideColumn: true }
  const features = { ...baseFeatures, scan_gap_h: steady(0.02) }
  const single = { distance_km: 0.71, scan_gap_h: 0.6 }
  const head: SideResult = { ...sideResult({ features, single }), singleFeatureSlices: { scan_gap_h: slice } }
  const baseWith = (separation: number): SideResult => ({
    ...sideResult({ side: 'base', features, single }),
    singleFeatureSlices: { scan_gap_h: { column: 'depot', value: 'airport', rows: 90, separation } },
  })
  const lead =
    "Within the 120 holdout rows where depot is 'harbour', a model that sees only scan_gap_h and depot (so it can treat each depot apart) reaches AUC 0.995 " +
    '(on the whole holdout AUC 0.6; the policy line is 0.99). A value that gives the outcome away in one part of the data is often written after the fact by one system or site. '

  it('only warns when the base side already had a slice that strong and the feature did not change', () => {
    expect(check(baseWith(0.992), head)).toEqual([
      {
        kind: 'leakage',
        severity: 'warn',
        feature: 'scan_gap_h',
        title: 'scan_gap_h, unchanged here, alone separates the slice depot = harbour (AUC 0.995).',
        message: lead + 'It was already this strong in a slice on the base side (depot = airport, AUC 0.992).',
        evidence: {
          sliceColumn: 'depot',
          sliceValue: 'harbour',
          sliceRows: 120,
          sliceSeparation: 0.995,
          baseSliceSeparation: 0.992,
          singleFeatureSeparation: 0.6,
          threshold: 0.99,
          isNew: false,
          isChanged: false,
        },
      },
    ])
  })

  it('takes the policy action for a changed feature, or one whose base slice was below the line (inclusive at the line)', () => {
    const [changed] = check(baseWith(0.992), head, { changed: ['scan_gap_h'] })
    expect(changed).toMatchObject({ severity: 'block', title: 'scan_gap_h, changed here, alone separates the slice depot = harbour (AUC 0.995).' })
    expect(changed.message).toBe(lead + 'Check how scan_gap_h is recorded for depot = harbour.')
    expect(check(baseWith(0.98), head)[0].severity).toBe('block')
    expect(check(baseWith(0.99), head)[0].severity).toBe('warn')
    expect(check(sideResult({ side: 'base', features, single }), head)[0]).toMatchObject({ severity: 'block', evidence: { baseSliceSeparation: null } })
    // The slice line is singleFeaturePower, inclusive; below it this rule says nothing.
    expect(check(baseWith(0.5), head, {}, { singleFeaturePower: 0.995 })).toHaveLength(1)
    expect(check(baseWith(0.5), head, {}, { singleFeaturePower: 0.996 })).toEqual([])
  })

  it('says only the feature\'s name when the slice model did not see the slice column', () => {
    const plain: SideResult = { ...head, singleFeatureSlices: { scan_gap_h: { ...slice, besideColumn: false } } }
    expect(check(baseWith(0.5), plain)[0].message).toContain("a model that sees only scan_gap_h reaches AUC 0.995 (on the whole holdout AUC 0.6; ")
  })

  it('reports a feature once: the whole-holdout finding takes precedence over its slice', () => {
    const both: SideResult = { ...head, singleFeatureSeparation: { ...single, scan_gap_h: 0.999 } }
    const findings = check(baseWith(0.5), both)
    expect(findings.map((f) => f.title)).toEqual(['scan_gap_h, unchanged here, alone separates the holdout (AUC 0.999).'])
  })
})

describe('checkLeakage: the lift rule, in these words', () => {
  // The drop-column losses: steady(drop, 0.004) over five refits has SD 0.004·sqrt(0.625) = 0.0031623,
  // so a drop of 0.2 is 63.25 reseed SDs with 95% interval 0.1961 to 0.2039 and one-sided p = 7.498e-9
  // (scipy.stats.ttest_1samp(alternative='greater') and t.interval, SciPy 1.10.1); lift share 0.2 / 0.5 = 40%.
  const withLoss = (side: SideResult, losses: readonly number[], drops: Readonly<Record<string, readonly number[]>> = {}): SideResult => ({
    ...side,
    losses,
    dropColumns: Object.fromEntries(Object.entries(drops).map(([name, d]) => [name, dropColumnImportance(losses, losses.map((l, r) => l + d[r]))])),
  })
  const base = withLoss(sideResult({ side: 'base', features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.71 } }), steady(0.5, 0.004))
  const headWith = (drop: number, single: Record<string, number> = { distance_km: 0.71, followup_score: 0.9 }) =>
    withLoss(sideResult({ features: { ...baseFeatures, followup_score: steady(0.04) }, separation: steady(0.9, 0.005), single }), steady(0.5 - drop, 0.004), {
      followup_score: steady(drop, 0.004),
    })
  const classic = 'One new feature that removes this much of the remaining error is the classic sign of a value computed from, or after, the outcome (common practice); '

  it('blocks at lift_block or more, naming the loss the policy metric implies', () => {
    const [finding] = check(base, headWith(0.2), { added: ['followup_score'] }, { metricName: 'auc' })
    expect(finding.title).toBe(
      'followup_score, new here, carries 40% of the 1 − AUC the base model left (the model loses that much without it, 63.25 reseed SDs); ' +
        'alone AUC 0.9 against 0.71 for the best existing feature (distance_km).',
    )
    expect(finding.message).toBe(
      "Refitted without followup_score with the same seeds, the candidate's holdout 1 − AUC grows by 0.2 (95% interval 0.1961 to 0.2039, paired t-test p = 7.498e-9) " +
        'against a base 1 − AUC of 0.5: 40% of what the base model left. The candidate as a whole removes 40% of it; followup_score alone reaches AUC 0.9 ' +
        '(full base model 0.8, best existing single feature distance_km 0.71). ' +
        classic +
        'check that it is known at prediction time, and if a person has checked it, list it in checks.leakage.reviewed_columns.',
    )
    expect(finding.evidence).toMatchObject({ liftWarn: 0.15, liftBlock: 0.25, isNew: true, isChanged: false, isReviewed: false, dropColumnAboveNoise: true, bestExistingFeature: 'distance_km' })
    expect(finding.evidence.dropColumnInReseedSds as number).toBeCloseTo(0.2 / (0.004 * Math.sqrt(0.625)), 8)
    expect((finding.evidence.dropColumnPValue as number) / 7.4975006560925615e-9).toBeCloseTo(1, 4)
  })

  it('warns below lift_block and says so', () => {
    const [finding] = check(base, headWith(0.1), { changed: ['followup_score'] }, { metricName: undefined })
    expect(finding).toMatchObject({ severity: 'warn', evidence: { isNew: false, isChanged: true } })
    expect(finding.title).toMatch(/^followup_score, changed here, carries 20% of the loss the base model left \(/)
    expect(finding.message).toMatch(/ grows by 0\.1 \(95% interval 0\.09607 to 0\.1039, /)
    expect(finding.message.endsWith(classic + "below the policy's lift_block of 0.25, so this is a warning; check that it is known at prediction time.")).toBe(true)
    // At exactly lift_warn (0.075 / 0.5 = 0.15) it still warns; the line is inclusive.
    expect(check(base, headWith(0.075), { changed: ['followup_score'] })).toHaveLength(1)
  })

  it('warns about a reviewed column and says it is listed', () => {
    const [finding] = check(base, headWith(0.2), { added: ['followup_score'] }, { metricName: 'rmse', reviewedColumns: ['followup_score'] })
    expect(finding).toMatchObject({ severity: 'warn', evidence: { isReviewed: true } })
    expect(finding.title).toContain('carries 40% of the squared error the base model left')
    expect(finding.message.endsWith(classic + 'it is listed in checks.leakage.reviewed_columns as reviewed and known at prediction time, so this is a warning.')).toBe(true)
  })

  it('leaves out the one-feature comparison it has no value for', () => {
    const noAlone = check(base, headWith(0.2, { distance_km: 0.71 }), { added: ['followup_score'] }, { metricName: 'accuracy' })[0]
    expect(noAlone.title).toBe('followup_score, new here, carries 40% of the error rate the base model left (the model loses that much without it, 63.25 reseed SDs).')
    expect(noAlone.message).toContain('The candidate as a whole removes 40% of it. One new feature')
    expect(noAlone.evidence).toMatchObject({ powerAgainstBaseModel: null, powerAgainstBestFeature: null })
    const noBest = check({ ...base, singleFeatureSeparation: {} }, headWith(0.2, { followup_score: 0.9 }), { added: ['followup_score'] }, { metricName: 'r2' })[0]
    expect(noBest.title).toBe('followup_score, new here, carries 40% of the 1 − R² the base model left (the model loses that much without it, 63.25 reseed SDs); alone AUC 0.9.')
    expect(noBest.message).toContain('followup_score alone reaches AUC 0.9 (full base model 0.8). One new feature')
    expect(noBest.evidence.bestExistingFeature).toBeNull()
  })

  it('uses any other metric name as the loss word', () => {
    expect(check(base, headWith(0.2), { added: ['followup_score'] }, { metricName: 'log-loss' })[0].title).toContain('carries 40% of the log-loss the base model left')
  })

  it('looks at new or changed features only', () => {
    expect(check(base, headWith(0.2))).toEqual([])
  })
})

describe('checkLeakage: a slice leak below the slice line, in these words', () => {
  it('warns with the slice, the whole-holdout power and the drop-column loss', () => {
    const losses = steady(0.5, 0.004)
    const headLosses = steady(0.46, 0.004)
    const base: SideResult = { ...sideResult({ side: 'base', features: baseFeatures, single: { distance_km: 0.71 } }), losses, dropColumns: {} }
    const head: SideResult = {
      ...sideResult({ features: { ...baseFeatures, followup_score: steady(0.02) }, single: { distance_km: 0.71, followup_score: 0.6 } }),
      singleFeatureSlices: { followup_score: { column: 'depot', value: 'harbour', rows: 120, separation: 0.995, besideColumn: true } },
      losses: headLosses,
      dropColumns: { followup_score: dropColumnImportance(headLosses, headLosses.map((l, r) => l + steady(0.04, 0.004)[r])) },
    }
    // Lift share 0.04 / 0.5 = 8% (below lift_warn); 0.04 / 0.0031623 = 12.65 reseed SDs.
    const findings = check(base, head, { added: ['followup_score'] }, { singleFeaturePower: 0.999 })
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'leakage',
      severity: 'warn',
      feature: 'followup_score',
      title: 'followup_score, new here, alone nearly separates the slice depot = harbour (AUC 0.995) and the model needs it (8% of the loss the base model left).',
      message:
        "Within the 120 holdout rows where depot is 'harbour', a model that sees only followup_score and depot (so it can treat each depot apart) reaches AUC 0.995 " +
        "(on the whole holdout AUC 0.6), and refitted without it the candidate's loss grows by 0.04 (12.65 reseed SDs). A value that gives the outcome away in one part " +
        'of the data is often written after the fact by one system or site; check how followup_score is recorded for depot = harbour.',
      evidence: { sliceColumn: 'depot', sliceValue: 'harbour', sliceRows: 120, sliceSeparation: 0.995, sliceWarnPower: 0.9, isNew: true, isChanged: false },
    })
    // The line is inclusive; a drop-column loss within noise says nothing.
    expect(check(base, head, { added: ['followup_score'] }, { singleFeaturePower: 0.999, sliceWarnPower: 0.995 })).toHaveLength(1)
    const noisy: SideResult = { ...head, dropColumns: { followup_score: dropColumnImportance(headLosses, headLosses.map((l, r) => l + [0.3, -0.3, 0.2, -0.2, 0][r])) } }
    expect(check(base, noisy, { added: ['followup_score'] }, { singleFeaturePower: 0.999 })).toEqual([])
  })
})

describe('checkLeakage: the edges of dominance', () => {
  const dominant = { distance_km: steady(0.8), stop_count: steady(0.12), depot: steady(0.08) }
  const base = sideResult({ side: 'base', features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })

  it('says "infinitely" the runner-up when no other feature has positive importance, and names no runner-up without one', () => {
    const alone = sideResult({ features: { distance_km: steady(0.8), stop_count: steady(-0.01) }, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(base, alone, { changed: ['distance_km'] })
    expect(finding.title).toBe('distance_km, changed here, dominates the model (100% of the importance, infinitely the runner-up).')
    expect(finding.message).toMatch(/^distance_km carries 100% of the total positive importance, infinitely as much as stop_count, and /)
    expect(finding.evidence).toMatchObject({ runnerUpRatio: null, runnerUp: 'stop_count' })
    const single = sideResult({ features: { distance_km: steady(0.8) }, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const [only] = check(base, single, { changed: ['distance_km'] })
    expect(only.message).toMatch(/^distance_km carries 100% of the total positive importance, and a model that sees only it earns /)
    expect(only.evidence.runnerUp).toBeNull()
  })

  it('finds no dominance when the top importance is not positive or the full model is no better than trivial', () => {
    const flat = sideResult({ features: { distance_km: steady(0), stop_count: steady(-0.1) }, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    expect(check(base, flat, { changed: ['distance_km'] })).toEqual([])
    const trivial = sideResult({ features: dominant, separation: steady(0.5, 0), single: { distance_km: 0.9 } })
    expect(check(base, trivial, { changed: ['distance_km'] })).toEqual([])
  })

  it('turns a dominance block on a reviewed column into a warning, and leaves info and warn as they are', () => {
    const head = sideResult({ features: dominant, separation: steady(0.95, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(base, head, { changed: ['distance_km'] }, { reviewedColumns: ['distance_km'] })
    expect(finding).toMatchObject({ severity: 'warn', evidence: { isReviewed: true } })
    expect(check(base, head, { changed: ['distance_km'] }, { reviewedColumns: ['distance_km'], action: 'warn' })[0].severity).toBe('warn')
    expect(check(base, head, {}, { reviewedColumns: ['distance_km'] })[0].severity).toBe('info')
  })

  it('was dominant on the base only if it was the base\'s top feature with at least dominanceShare', () => {
    // Base: depot leads (0.5 of 1.0), distance_km second: distance_km was not dominant, so a warning.
    const otherTop = sideResult({ side: 'base', features: { distance_km: steady(0.3), stop_count: steady(0.2), depot: steady(0.5) }, separation: steady(0.92, 0.005) })
    const head = sideResult({ features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    expect(check(otherTop, head)[0]).toMatchObject({ severity: 'warn', evidence: { wasDominantOnBase: false } })
    // Base top at exactly 0.5 of the positive importance: dominant there, so information.
    const atLine = sideResult({ side: 'base', features: { distance_km: steady(0.5), stop_count: steady(0.3), depot: steady(0.2) }, separation: steady(0.92, 0.005) })
    expect(check(atLine, head)[0]).toMatchObject({ severity: 'info', evidence: { wasDominantOnBase: true } })
  })

  it('gives no score jump in reseed SDs with one refit on a side, or with no spread', () => {
    const oneRefit = sideResult({ side: 'base', features: { distance_km: [0.8], stop_count: [0.12], depot: [0.08] }, separation: [0.92], single: { distance_km: 0.9 } })
    const head = sideResult({ features: dominant, separation: steady(0.95, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(oneRefit, head, { changed: ['distance_km'] })
    expect(finding.message.endsWith("On the base side its share was 80%; the full model's AUC went from 0.92 to 0.95.")).toBe(true)
    expect(finding.evidence.separationJumpInSds).toBeNull()
    // Constant separations exact in binary (0.875, 0.9375), so the SD is exactly 0.
    const still = sideResult({ side: 'base', features: dominant, separation: steady(0.875, 0), single: { distance_km: 0.9 } })
    const fixed = sideResult({ features: dominant, separation: steady(0.9375, 0), single: { distance_km: 0.9 } })
    expect(check(still, fixed, { changed: ['distance_km'] })[0].evidence.separationJumpInSds).toBeNull()
    // A drop counts with its sign: (0.89 − 0.92) / 0.00395 = −7.589.
    const lower = sideResult({ features: dominant, separation: steady(0.89, 0.005), single: { distance_km: 0.86 } })
    expect(check(base, lower, { changed: ['distance_km'] })[0].evidence.separationJumpInSds as number).toBeCloseTo(-0.03 / Math.sqrt(6.25e-5 / 4), 6)
  })
})

describe('checkLeakage: the remaining edges of each finding', () => {
  const dominant = { distance_km: steady(0.8), stop_count: steady(0.12), depot: steady(0.08) }

  it('ends with "Check that it is known" for a new feature whatever the action, and counts a base value at the line as already strong', () => {
    const base = sideResult({ side: 'base', features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.99 } })
    const head = sideResult({ features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.995 } })
    const [unchanged] = check(base, head)
    expect(unchanged.severity).toBe('warn')
    expect(unchanged.message.endsWith('It was already this strong on the base side (AUC 0.99), so this pull request did not introduce it.')).toBe(true)
    const [changed] = check(base, head, { changed: ['distance_km'] }, { action: 'warn' })
    expect(changed.message.endsWith('Check that it is known at prediction time.')).toBe(true)
    const slice = { column: 'depot', value: 'harbour', rows: 120, separation: 0.995, besideColumn: false }
    const sliced = (side: SideResult): SideResult => ({ ...side, singleFeatureSeparation: { distance_km: 0.6 }, singleFeatureSlices: { distance_km: slice } })
    const [slicedChanged] = check(sliced(base), sliced(head), { changed: ['distance_km'] }, { action: 'warn' })
    expect(slicedChanged.message.endsWith('Check how distance_km is recorded for depot = harbour.')).toBe(true)
  })

  it('gives the lift fields with a whole-holdout finding, and the one-feature powers when they are known', () => {
    const losses = steady(0.5, 0.004)
    const headLosses = steady(0.3, 0.004)
    const base: SideResult = { ...sideResult({ side: 'base', features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.71 } }), losses }
    const head: SideResult = {
      ...sideResult({ features: { ...baseFeatures, followup_score: steady(0.04) }, separation: steady(0.9, 0.005), single: { distance_km: 0.71, followup_score: 0.995 } }),
      losses: headLosses,
      dropColumns: { followup_score: dropColumnImportance(headLosses, headLosses.map((l, r) => l + steady(0.2, 0.004)[r])) },
    }
    const [finding] = check(base, head, { added: ['followup_score'] })
    expect(finding.title).toBe('followup_score, new here, alone separates the holdout (AUC 0.995).')
    expect(finding.evidence.liftShare as number).toBeCloseTo(0.4, 10)
    // (0.995 − 0.5) / (0.8 − 0.5) against the base model, (0.995 − 0.5) / (0.71 − 0.5) against distance_km.
    expect(finding.evidence.powerAgainstBaseModel as number).toBeCloseTo(0.495 / 0.3, 10)
    expect(finding.evidence.powerAgainstBestFeature as number).toBeCloseTo(0.495 / 0.21, 10)
  })

  it('says n/a for a slice-warn feature without a whole-holdout one-feature value', () => {
    const losses = steady(0.5, 0.004)
    const headLosses = steady(0.46, 0.004)
    const base: SideResult = { ...sideResult({ side: 'base', features: baseFeatures, single: {} }), losses, dropColumns: {} }
    const head: SideResult = {
      ...sideResult({ features: { ...baseFeatures, scan_gap_h: steady(0.02) }, single: {} }),
      singleFeatureSlices: { scan_gap_h: { column: 'depot', value: 'harbour', rows: 120, separation: 0.95, besideColumn: false } },
      losses: headLosses,
      dropColumns: { scan_gap_h: dropColumnImportance(headLosses, headLosses.map((l) => l + 0.04)) },
    }
    const [finding] = check(base, head, { added: ['scan_gap_h'] })
    expect(finding.message).toContain('reaches AUC 0.95 (on the whole holdout AUC n/a), and refitted without it')
  })

  it('keeps the one-feature value in the dominance evidence, and measures the score jump from two refits a side', () => {
    const base = sideResult({ side: 'base', features: { distance_km: [0.8, 0.8], stop_count: [0.12, 0.12], depot: [0.08, 0.08] }, separation: [0.91, 0.93], single: { distance_km: 0.9 } })
    const head = sideResult({ features: { distance_km: [0.8, 0.8], stop_count: [0.12, 0.12], depot: [0.08, 0.08] }, separation: [0.94, 0.96], single: { distance_km: 0.9 } })
    const [finding] = check(base, head, { changed: ['distance_km'] })
    expect(finding.evidence.singleFeatureSeparation).toBe(0.9)
    // Means 0.92 and 0.95, SD sqrt(0.0002) on each side: 0.03 / 0.014142 = 2.1213 reseed SDs.
    expect(finding.evidence.separationJumpInSds as number).toBeCloseTo(0.03 / Math.sqrt(0.0002), 8)
  })

  it('was not dominant on the base when another feature led there, even at the same share', () => {
    // Base: depot and distance_km at 0.5 each; depot leads by name, so distance_km did not dominate there.
    const base = sideResult({ side: 'base', features: { distance_km: steady(0.5), depot: steady(0.5) }, separation: steady(0.92, 0.005) })
    const head = sideResult({ features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    expect(check(base, head)[0]).toMatchObject({ severity: 'warn', evidence: { wasDominantOnBase: false, baseShare: 0.5 } })
  })
})
