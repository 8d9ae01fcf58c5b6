import { describe, expect, it } from 'vitest'
import type { SideResult } from '../../../src/core/checks/side-result.ts'
import { baseFeatures, check, options } from './leakage-context.ts'
import { sideResult, steady } from './side-results.ts'
import { dropColumnImportance } from '../../../src/core/importance/drop-column-importance.ts'


describe('checkLeakage(context, options): a feature that alone separates the holdout', () => {
  const base = sideResult({ side: 'base', features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.71 } })

  it('blocks a new feature with a near-perfect one-feature AUC, in these words', () => {
    const head = sideResult({
      features: { ...baseFeatures, scan_delay_h: steady(0.3) },
      separation: steady(0.975, 0.005),
      single: { distance_km: 0.71, scan_delay_h: 0.995 },
    })
    const findings = check(base, head, { added: ['scan_delay_h'] })
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'leakage',
      severity: 'block',
      feature: 'scan_delay_h',
      title: 'scan_delay_h, new here, alone separates the holdout (AUC 0.995).',
      message:
        'A model that sees only scan_delay_h reaches holdout AUC 0.995 (the full model reaches 0.975; the policy line is 0.99). ' +
        'A value this predictive on its own usually means it is computed from, or after, the outcome. Check that it is known at prediction time.',
      evidence: { singleFeatureSeparation: 0.995, baseSingleFeatureSeparation: null, threshold: 0.99, isNew: true, isChanged: false },
    })
    // By hand: 0.3 / (0.3 + 0.05 + 0.03 + 0.01).
    expect(findings[0].evidence.share).toBeCloseTo(0.3 / 0.39, 12)
    expect(findings[0].evidence.fullModelSeparation).toBeCloseTo(0.975, 12)
  })

  it('only warns about an unchanged feature that was already that strong on the base side', () => {
    const strong = { ...baseFeatures, final_scan_hour: steady(0.3) }
    const single = { distance_km: 0.71, final_scan_hour: 0.995 }
    const before = sideResult({ side: 'base', features: strong, separation: steady(0.975, 0.005), single })
    const after = sideResult({ features: strong, separation: steady(0.975, 0.005), single })
    const [finding] = check(before, after)
    expect(finding.severity).toBe('warn')
    expect(finding.title).toBe('final_scan_hour, unchanged here, alone separates the holdout (AUC 0.995).')
    expect(finding.message).toBe(
      'A model that sees only final_scan_hour reaches holdout AUC 0.995 (the full model reaches 0.975; the policy line is 0.99). ' +
        'A value this predictive on its own usually means it is computed from, or after, the outcome. ' +
        'It was already this strong on the base side (AUC 0.995), so this pull request did not introduce it.',
    )
    // Changed in the pull request, or newly crossing the line: the policy action again.
    expect(check(before, after, { changed: ['final_scan_hour'] })[0].severity).toBe('block')
    const weakerBefore = sideResult({ side: 'base', features: strong, separation: steady(0.975, 0.005), single: { final_scan_hour: 0.9 } })
    expect(check(weakerBefore, after)[0]).toMatchObject({ severity: 'block', title: 'final_scan_hour, unchanged here, alone separates the holdout (AUC 0.995).' })
  })

  it('draws the line at singleFeaturePower inclusively, and says R² for regression', () => {
    const head = (alone: number) => sideResult({ features: { ...baseFeatures, roadworks_km: steady(0.02) }, separation: steady(0.6), single: { roadworks_km: alone } })
    expect(check(base, head(0.99), { added: ['roadworks_km'] }).map((f) => f.feature)).toEqual(['roadworks_km'])
    expect(check(base, head(0.9899), { added: ['roadworks_km'] })).toEqual([])
    const [regression] = check(base, head(0.995), { added: ['roadworks_km'] }, { task: 'regression' })
    expect(regression.title).toBe('roadworks_km, new here, alone separates the holdout (R² 0.995).')
  })

  it('finds nothing when the check is off', () => {
    const head = sideResult({ features: { ...baseFeatures, scan_delay_h: steady(0.9) }, single: { scan_delay_h: 1 } })
    expect(check(base, head, { added: ['scan_delay_h'] }, { action: 'off' })).toEqual([])
  })
})

describe('checkLeakage(context, options): one feature dominating the model', () => {
  const dominant = { distance_km: steady(0.8), stop_count: steady(0.12), depot: steady(0.08) }

  it('reports a dominant feature that was already dominant and did not change as information only, in these words', () => {
    const base = sideResult({ side: 'base', features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const head = sideResult({ features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const findings = check(base, head)
    expect(findings).toHaveLength(1)
    // By hand: share 0.8 / 1.0; ratio 0.8 / 0.12 = 6.67; relative power (0.9 − 0.5) / (0.92 − 0.5) = 0.952.
    expect(findings[0]).toMatchObject({
      kind: 'leakage',
      severity: 'info',
      feature: 'distance_km',
      title: 'distance_km, unchanged here, dominates the model (80% of the importance, 6.667× the runner-up).',
      message:
        "distance_km carries 80% of the total positive importance, 6.667× as much as stop_count, and a model that sees only it earns 95.2% of the full model's gain over a trivial predictor " +
        '(AUC 0.9 alone vs 0.92 for the full model). It already dominated the base model (80%) and did not change, so this is reported for information.',
      evidence: { runnerUp: 'stop_count', isNew: false, isChanged: false, wasDominantOnBase: true },
    })
    expect(findings[0].evidence.relativePower).toBeCloseTo(0.4 / 0.42, 12)
  })

  it('blocks the same dominance when the feature changed, giving the score jump in reseed SDs', () => {
    const base = sideResult({ side: 'base', features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const head = sideResult({ features: dominant, separation: steady(0.95, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(base, head, { changed: ['distance_km'] })
    // By hand: steady(·, 0.005) has SD sqrt(6.25e-5 / 4) = 0.00395 on both sides; (0.95 − 0.92) / 0.00395 = 7.59.
    expect(finding.severity).toBe('block')
    expect(finding.title).toBe('distance_km, changed here, dominates the model (80% of the importance, 6.667× the runner-up).')
    expect(finding.message).toBe(
      "distance_km carries 80% of the total positive importance, 6.667× as much as stop_count, and a model that sees only it earns 88.9% of the full model's gain over a trivial predictor " +
        '(AUC 0.9 alone vs 0.95 for the full model). On the base side its share was 80%; the full model\'s AUC went from 0.92 to 0.95 (7.589 reseed SDs).',
    )
    expect(finding.evidence.separationJumpInSds).toBeCloseTo(0.03 / Math.sqrt(6.25e-5 / 4), 6)
  })

  it('says of an added dominant feature that the base side does not have it, not that its share there was 0%', () => {
    const base = sideResult({ side: 'base', features: { stop_count: steady(0.1), depot: steady(0.02) }, separation: steady(0.92, 0.005) })
    const head = sideResult({ features: dominant, separation: steady(0.95, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(base, head, { added: ['distance_km'] })
    expect(finding.title).toMatch(/^distance_km, new here, dominates the model/)
    expect(finding.message).toContain('The base side does not have it; the full model')
    expect(finding.message).not.toContain('its share was')
  })

  it('warns when a feature becomes dominant without having changed (others were removed or weakened)', () => {
    const base = sideResult({ side: 'base', features: { distance_km: steady(0.3), stop_count: steady(0.4), depot: steady(0.3) }, separation: steady(0.92, 0.005) })
    const head = sideResult({ features: dominant, separation: steady(0.92, 0.005), single: { distance_km: 0.9 } })
    const [finding] = check(base, head)
    expect(finding).toMatchObject({ severity: 'warn', evidence: { wasDominantOnBase: false } })
    expect(finding.evidence.baseShare).toBeCloseTo(0.3, 12)
  })

  // Boundaries: every rule is "at or above". Exact binary fractions, identical in every refit.
  const exact = (features: Record<string, number>, alone: number, full: number) =>
    sideResult({
      features: Object.fromEntries(Object.entries(features).map(([name, v]) => [name, [v, v, v]])),
      separation: [full, full, full],
      single: { top: alone },
    })
  const base = exact({ top: 0.1, b: 1, c: 1, d: 1 }, 0.1, 0.5)
  const dominates = (head: SideResult) => check(base, head, { added: [] }, { task: 'regression' }).length === 1

  it('draws the dominance share line at exactly dominanceShare', () => {
    // Share 4 / 8 = 0.5, ratio 4: dominates; 4 / 8.01 < 0.5: does not.
    expect(dominates(exact({ top: 4, b: 1, c: 1, d: 1, e: 1 }, 0.4, 0.5))).toBe(true)
    expect(dominates(exact({ top: 4, b: 1, c: 1, d: 1, e: 1.01 }, 0.4, 0.5))).toBe(false)
  })

  it('draws the runner-up ratio line at exactly runnerUpRatio', () => {
    // Ratio 3 / 1 = 3 (share 0.75): dominates; 3 / 1.01 < 3: does not.
    expect(dominates(exact({ top: 3, b: 1 }, 0.4, 0.5))).toBe(true)
    expect(dominates(exact({ top: 3, b: 1.01 }, 0.4, 0.5))).toBe(false)
  })

  it('draws the relative power line at exactly relativePower (R² gain over 0 for regression)', () => {
    // Relative power 0.4 / 0.5 = 0.8: dominates; 0.3999 / 0.5 < 0.8: does not.
    expect(dominates(exact({ top: 3, b: 1 }, 0.4, 0.5))).toBe(true)
    expect(dominates(exact({ top: 3, b: 1 }, 0.3999, 0.5))).toBe(false)
    // No one-feature score at all: relative power unknown, so no dominance finding.
    const unknown = sideResult({ features: { top: [3, 3, 3], b: [1, 1, 1] }, separation: [0.5, 0.5, 0.5] })
    expect(check(base, unknown, {}, { task: 'regression' })).toEqual([])
  })
})

describe('checkLeakage(context, options) on a holdout that cannot show a leak', () => {
  it('blocks when the one-class holdout leaves AUC undefined, and says the check could not be evaluated', () => {
    const base = sideResult({ side: 'base', features: baseFeatures, separation: steady(NaN, 0), single: { distance_km: NaN } })
    const head = sideResult({ features: { ...baseFeatures, leak: steady(0.4) }, separation: steady(NaN, 0), single: { distance_km: NaN, leak: NaN } })
    const findings = check(base, head, { added: ['leak'] })
    expect(findings[0]).toMatchObject({
      kind: 'leakage',
      severity: 'block',
      title: 'The leakage check could not be evaluated on the head side: the holdout holds one class only, so AUC is undefined.',
      evidence: { unevaluatedFeatures: 2, fullModelUndefined: true },
    })
    expect(findings[0].message).toMatch(/^No holdout AUC could be computed for the full model and the one-feature models of distance_km, leak\. /)
    expect(check(base, head, { added: ['leak'] }, { action: 'warn' })[0].severity).toBe('warn')
    expect(check(base, head, { added: ['leak'] }, { action: 'off' })).toEqual([])
  })
})

describe('checkLeakage(context, options): the lift rule (docs/leak-rule.md)', () => {
  // Losses are log-loss per refit; the head refitted without followup_score loses `drop` more.
  const withLoss = (side: SideResult, losses: readonly number[], drops: Readonly<Record<string, readonly number[]>> = {}): SideResult => ({
    ...side,
    losses,
    dropColumns: Object.fromEntries(Object.entries(drops).map(([name, d]) => [name, dropColumnImportance(losses, losses.map((l, r) => l + d[r]))])),
  })
  const base = withLoss(sideResult({ side: 'base', features: baseFeatures, separation: steady(0.8, 0.005), single: { distance_km: 0.71 } }), steady(0.5, 0.004))
  const headWith = (drop: number, alone = 0.9) =>
    withLoss(
      sideResult({ features: { ...baseFeatures, followup_score: steady(0.04) }, separation: steady(0.9, 0.005), single: { distance_km: 0.71, followup_score: alone } }),
      steady(0.5 - drop, 0.004),
      { followup_score: steady(drop, 0.004) },
    )

  it('blocks a new feature that carries lift_block or more of the base model\'s remaining loss, naming the cause first', () => {
    const [finding] = check(base, headWith(0.2), { added: ['followup_score'] })
    expect(finding).toMatchObject({ kind: 'leakage', severity: 'block', feature: 'followup_score' })
    expect(finding.title).toMatch(/^followup_score, new here, carries 40% of the log-loss the base model left/)
    expect(finding.title).toContain('alone AUC 0.9 against 0.71 for the best existing feature (distance_km)')
    // lift share 0.2 / 0.5; power against the best existing feature (0.9 − 0.5) / (0.71 − 0.5).
    expect(finding.evidence.liftShare).toBeCloseTo(0.4, 10)
    expect(finding.evidence.powerAgainstBestFeature).toBeCloseTo(0.4 / 0.21, 10)
    expect(finding.evidence.dropColumnAboveNoise).toBe(true)
  })

  it('warns between lift_warn and lift_block, and says nothing below lift_warn', () => {
    expect(check(base, headWith(0.1), { added: ['followup_score'] })[0]).toMatchObject({ severity: 'warn', feature: 'followup_score' })
    expect(check(base, headWith(0.05), { added: ['followup_score'] })).toEqual([])
  })

  it('calls a drop-column loss within reseed noise nothing, however large its share would be', () => {
    const noisy = withLoss(headWith(0.2), steady(0.3, 0.004), { followup_score: [0.4, -0.1, 0.5, -0.2, 0.4] })
    expect(check(base, noisy, { added: ['followup_score'] })).toEqual([])
  })

  it('turns a lift block on a reviewed column into a warning that still names it, but never a one-feature block', () => {
    const reviewed = { reviewedColumns: ['followup_score'] }
    const [lift] = check(base, headWith(0.2), { added: ['followup_score'] }, reviewed)
    expect(lift).toMatchObject({ severity: 'warn', feature: 'followup_score' })
    expect(lift.evidence.isReviewed).toBe(true)
    expect(lift.message).toContain('checks.leakage.reviewed_columns')
    const [alone] = check(base, headWith(0.2, 0.995), { added: ['followup_score'] }, reviewed)
    expect(alone).toMatchObject({ severity: 'block', feature: 'followup_score' })
  })
})

describe('checkLeakage(context, options): a slice leak below the slice line', () => {
  it('warns, naming the feature, when the model needs it and it alone nearly separates one slice', () => {
    const losses = steady(0.5, 0.004)
    const base: SideResult = { ...sideResult({ side: 'base', features: baseFeatures, single: { distance_km: 0.71 } }), losses, dropColumns: {} }
    const headLosses = steady(0.46, 0.004)
    const head: SideResult = {
      ...sideResult({ features: { ...baseFeatures, scan_gap_h: steady(0.02) }, single: { distance_km: 0.71, scan_gap_h: 0.6 } }),
      singleFeatureSlices: { scan_gap_h: { column: 'depot', value: 'harbour', rows: 120, separation: 0.95 } },
      losses: headLosses,
      dropColumns: { scan_gap_h: dropColumnImportance(headLosses, headLosses.map((l) => l + 0.04)) },
    }
    const [finding] = check(base, head, { added: ['scan_gap_h'] })
    expect(finding).toMatchObject({ kind: 'leakage', severity: 'warn', feature: 'scan_gap_h' })
    expect(finding.title).toMatch(/^scan_gap_h, new here, alone nearly separates the slice depot = harbour \(AUC 0\.95\)/)
    expect(check(base, head, { added: ['scan_gap_h'] }, { sliceWarnPower: 0.96 })).toEqual([])
  })
})
