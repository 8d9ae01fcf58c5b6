import { describe, expect, it } from 'vitest'
import { decideVerdict, orderFindings, sortFindings, writeHeadline } from '../../../src/core/checks/verdict.ts'
import type { Finding, Severity } from '../../../src/core/report/report.ts'

function finding(severity: Severity, title: string): Finding {
  return { kind: 'leakage', severity, title, message: '', evidence: {} }
}

describe('decideVerdict(findings) and writeHeadline(verdict, findings)', () => {
  it('blocks if any finding blocks, else warns if any warns, else passes', () => {
    expect(decideVerdict([finding('info', 'a'), finding('warn', 'b'), finding('block', 'c')])).toBe('block')
    expect(decideVerdict([finding('info', 'a'), finding('warn', 'b')])).toBe('warn')
    expect(decideVerdict([finding('info', 'a')])).toBe('pass')
    expect(decideVerdict([])).toBe('pass')
  })

  it('sorts block, warn, info and keeps the checks’ order within a severity', () => {
    const findings = [finding('info', 'i1'), finding('warn', 'w1'), finding('block', 'b1'), finding('warn', 'w2'), finding('block', 'b2')]
    expect(sortFindings(findings).map((f) => f.title)).toEqual(['b1', 'b2', 'w1', 'w2', 'i1'])
  })

  it('writes the pass headline in these words', () => {
    expect(writeHeadline('pass', [finding('info', 'The added feature x is not measurably used by the candidate model.')])).toBe(
      'Passed: no leakage-like dominance, rank shift or score regression beyond reseed noise was found.',
    )
  })

  it('leads with the first deciding finding, lowers a leading common word, and counts the rest', () => {
    const leak = finding('block', 'scan_delay_h alone separates the holdout (AUC 1); it is new in this pull request.')
    const score = finding('block', 'Holdout auc got worse: 0.8 → 0.7 (by 0.1, beyond noise).')
    const rows = finding('block', 'The two sides are not scored on the same holdout rows: 4 rows on the base side, 3 on the head.')
    const shift = finding('warn', "Distance_km's importance fell from 10 to 5 (50%) and kept its rank.")
    expect(writeHeadline('block', [shift, leak])).toBe('Blocked: scan_delay_h alone separates the holdout (AUC 1); it is new in this pull request.')
    expect(writeHeadline('block', [shift, score, leak])).toBe(
      'Blocked: holdout auc got worse: 0.8 → 0.7 (by 0.1, beyond noise) (and 1 more blocking finding).',
    )
    expect(writeHeadline('block', [rows, score, leak])).toBe(
      'Blocked: the two sides are not scored on the same holdout rows: 4 rows on the base side, 3 on the head (and 2 more blocking findings).',
    )
    // Feature names keep their case.
    expect(writeHeadline('warn', [shift, finding('info', 'x')])).toBe("Passed with warnings: Distance_km's importance fell from 10 to 5 (50%) and kept its rank.")
    expect(writeHeadline('warn', [shift, shift])).toBe(
      "Passed with warnings: Distance_km's importance fell from 10 to 5 (50%) and kept its rank (and 1 more warning finding).",
    )
  })
})

describe('orderFindings(findings, change): the report order', () => {
  // The rule is the report's own (docs in src/core/checks/verdict.ts): severity, then findings about a
  // feature the pull request touched, then cause before effect by kind, then strength, then input order.
  const noChange = { added: [], removed: [], changed: [] }
  const make = (kind: Finding['kind'], severity: Severity, title: string, evidence: Finding['evidence'] = {}, feature?: string): Finding => ({
    kind,
    severity,
    title,
    message: '',
    evidence,
    ...(feature === undefined ? {} : { feature }),
  })
  const titles = (findings: readonly Finding[], change: Parameters<typeof orderFindings>[1] = noChange) => orderFindings(findings, change).map((f) => f.title)

  it('puts block before warn before info, whatever the kind', () => {
    expect(titles([make('noise-model', 'info', 'i'), make('policy-changed', 'warn', 'w'), make('feature-set', 'block', 'b')])).toEqual(['b', 'w', 'i'])
  })

  it('within a severity, puts findings about an added, removed or changed feature (and the feature-set finding) first', () => {
    const findings = [
      make('leakage', 'warn', 'untouched leak', { share: 0.9 }, 'distance_km'),
      make('floor-drop', 'warn', 'removed', {}, 'old_zone'),
      make('rank-shift', 'warn', 'changed', {}, 'stop_count'),
      make('unused-feature', 'warn', 'added', {}, 'scan_delay_h'),
      make('feature-set', 'warn', 'feature set'),
    ]
    // The touched ones keep kind order among themselves: rank-shift 7, floor-drop 13, unused-feature 14, feature-set 17.
    expect(titles(findings, { added: ['scan_delay_h'], removed: ['old_zone'], changed: new Set(['stop_count']) })).toEqual([
      'changed',
      'removed',
      'added',
      'feature set',
      'untouched leak',
    ])
    // Without any change, the feature-set finding still counts as about the change; the rest by kind.
    expect(titles(findings)).toEqual(['feature set', 'untouched leak', 'changed', 'removed', 'added'])
  })

  it('orders kinds cause before effect (the feature-set finding, always about the change, aside)', () => {
    const kinds: Finding['kind'][] = [
      'run-error',
      'leakage',
      'holdout-rows',
      'score-regression',
      'share-redistribution',
      'slice-dominance',
      'slice-score',
      'rank-shift',
      'rank-agreement',
      'sensitivity-shift',
      'sensitivity-unlabeled',
      'gain-noise',
      'group-carried',
      'floor-drop',
      'unused-feature',
      'slice-top-features',
      'slice-too-small',
      'policy-changed',
      'noise-model',
    ]
    const reversed = [...kinds].reverse().map((kind) => make(kind, 'warn', kind))
    expect(titles(reversed)).toEqual(kinds)
  })

  it('within a kind, puts the stronger evidence first, in each kind’s own unit', () => {
    // Leakage: the largest of one-feature separation, slice separation and share.
    expect(
      titles([
        make('leakage', 'block', 'share 0.6', { share: 0.6 }),
        make('leakage', 'block', 'slice 0.97', { sliceSeparation: 0.97, share: 0.2 }),
        make('leakage', 'block', 'alone 0.995', { singleFeatureSeparation: 0.995, share: 0.3 }),
        make('leakage', 'block', 'share NaN', { share: NaN, singleFeatureSeparation: null }),
      ]),
    ).toEqual(['alone 0.995', 'slice 0.97', 'share 0.6', 'share NaN'])
    expect(titles([make('score-regression', 'warn', '2 SDs', { worseningInReseedSds: 2 }), make('score-regression', 'warn', '5 SDs', { worseningInReseedSds: 5 })])).toEqual([
      '5 SDs',
      '2 SDs',
    ])
    expect(titles([make('share-redistribution', 'warn', '0.2', { causeShare: 0.2 }), make('share-redistribution', 'warn', '0.7', { causeShare: 0.7 })])).toEqual([
      '0.7',
      '0.2',
    ])
    // Rank shift: |head − base| over sqrt((sd_base² + sd_head²) / 2). 0.1 over sqrt((0.03² + 0.04²)/2) =
    // 0.1 / 0.035355 = 2.83 SDs; 0.3 over sqrt((0.1² + 0.1²)/2) = 3 SDs; 0.01 with no spread is
    // infinitely many; no change and no spread is 0.
    expect(
      titles([
        make('rank-shift', 'warn', '2.83 SDs', { baseMean: 0.5, headMean: 0.4, baseRefitSd: 0.03, headRefitSd: 0.04 }),
        make('rank-shift', 'warn', 'no change', { baseMean: 0.5, headMean: 0.5, baseRefitSd: 0, headRefitSd: 0 }),
        make('rank-shift', 'warn', '3 SDs', { baseMean: 0.2, headMean: 0.5, baseRefitSd: 0.1, headRefitSd: 0.1 }),
        make('rank-shift', 'warn', 'exact', { baseMean: 0.2, headMean: 0.21, baseRefitSd: 0, headRefitSd: 0 }),
      ]),
    ).toEqual(['exact', '3 SDs', '2.83 SDs', 'no change'])
    // 2.9 SDs sits between them: only the pooled SD, not either side's SD alone, puts it there.
    expect(
      titles([
        make('rank-shift', 'warn', '2.83 SDs', { baseMean: 0.5, headMean: 0.4, baseRefitSd: 0.03, headRefitSd: 0.04 }),
        make('rank-shift', 'warn', '2.9 SDs', { baseMean: 0.5, headMean: 0.5 + 2.9 * 0.035355339059327376, baseRefitSd: 0.035355339059327376, headRefitSd: 0.035355339059327376 }),
      ]),
    ).toEqual(['2.9 SDs', '2.83 SDs'])
    // Rank agreement: how far Kendall's tau fell below its line.
    expect(
      titles([
        make('rank-agreement', 'warn', 'tau 0.5', { kendallTau: 0.5, kendallTauThreshold: 0.6 }),
        make('rank-agreement', 'warn', 'tau 0.1', { kendallTau: 0.1, kendallTauThreshold: 0.6 }),
      ]),
    ).toEqual(['tau 0.1', 'tau 0.5'])
  })

  it('keeps the checks’ order when nothing else tells two findings apart', () => {
    expect(titles([make('gain-noise', 'warn', 'first', { share: 0.1 }), make('gain-noise', 'warn', 'second', { share: 0.9 })])).toEqual(['first', 'second'])
    expect(titles([make('leakage', 'warn', 'first', { share: 0.5 }), make('leakage', 'warn', 'second', { share: 0.5 })])).toEqual(['first', 'second'])
  })
})

describe('the order of findings: ties and the strength of evidence', () => {
  const f = (kind: Finding['kind'], title: string, evidence: Finding['evidence'] = {}, feature?: string, severity: Severity = 'warn'): Finding => ({
    kind,
    severity,
    ...(feature ? { feature } : {}),
    title,
    message: '',
    evidence,
  })
  const none = { added: [], removed: [], changed: [] }
  const titles = (findings: readonly Finding[]) => findings.map((x) => x.title)

  it('keeps the input order within a severity (sortFindings) and among equal findings (orderFindings)', () => {
    const findings = [f('rank-shift', 'w1'), f('rank-shift', 'w2'), f('leakage', 'b', {}, undefined, 'block'), f('rank-shift', 'w3'), f('rank-shift', 'w4')]
    expect(titles(sortFindings(findings))).toEqual(['b', 'w1', 'w2', 'w3', 'w4'])
    expect(titles(orderFindings(findings, none))).toEqual(['b', 'w1', 'w2', 'w3', 'w4'])
  })

  it('measures a rank shift in pooled refit SDs of both sides: |head − base| / sqrt((sb² + sh²) / 2)', () => {
    // wide: 1 / sqrt((0 + 100) / 2) = 0.141; tight: 0.5 / sqrt((0 + 0.01) / 2) = 7.07; scaled: 2 / sqrt((16 + 16) / 2) = 0.5;
    // exact: a change with no spread at all is infinitely strong; still: no change and no spread is 0.
    const shifts = [
      f('rank-shift', 'wide', { baseMean: 1, headMean: 2, baseRefitSd: 0, headRefitSd: 10 }),
      f('rank-shift', 'scaled', { baseMean: 1, headMean: 3, baseRefitSd: 4, headRefitSd: 4 }),
      f('rank-shift', 'still', { baseMean: 1, headMean: 1, baseRefitSd: 0, headRefitSd: 0 }),
      f('rank-shift', 'tight', { baseMean: 1, headMean: 0.5, baseRefitSd: 0, headRefitSd: 0.1 }),
      f('rank-shift', 'exact', { baseMean: 1, headMean: 0.9, baseRefitSd: 0, headRefitSd: 0 }),
    ]
    expect(titles(orderFindings(shifts, none))).toEqual(['exact', 'tight', 'scaled', 'wide', 'still'])
  })

  it('reads a leak by the largest of its one-feature, slice and share values, and a missing or non-finite value as 0', () => {
    const leaks = [
      f('leakage', 'share', { share: 0.6 }),
      f('leakage', 'slice', { sliceSeparation: 0.97 }),
      f('leakage', 'whole', { singleFeatureSeparation: 0.9 }),
      f('leakage', 'none', { share: NaN, sliceSeparation: 'n/a' }),
    ]
    expect(titles(orderFindings([leaks[3], ...leaks.slice(0, 3)], none))).toEqual(['slice', 'whole', 'share', 'none'])
    const scores = [f('score-regression', 'unknown', { worseningInReseedSds: NaN }), f('score-regression', 'two', { worseningInReseedSds: 2 })]
    expect(titles(orderFindings(scores, none))).toEqual(['two', 'unknown'])
  })

  it('reads a ranking change by how far tau fell below its threshold, and a redistribution by its cause\'s share', () => {
    const rankings = [f('rank-agreement', 'near', { kendallTau: 0.5, kendallTauThreshold: 0.55 }), f('rank-agreement', 'far', { kendallTau: 0.1, kendallTauThreshold: 0.55 })]
    expect(titles(orderFindings(rankings, none))).toEqual(['far', 'near'])
    const causes = [f('share-redistribution', 'small', { causeShare: 0.2 }), f('share-redistribution', 'large', { causeShare: 0.4 })]
    expect(titles(orderFindings(causes, none))).toEqual(['large', 'small'])
    // Kinds without a strength keep their order.
    const slices = [f('slice-score', 's1', { worsening: 1 }), f('slice-score', 's2', { worsening: 3 })]
    expect(titles(orderFindings(slices, none))).toEqual(['s1', 's2'])
  })

  it('puts a finding about a touched feature first, and not one about an untouched feature', () => {
    const findings = [f('rank-shift', 'untouched', {}, 'distance_km'), f('rank-shift', 'no feature'), f('rank-shift', 'touched', {}, 'scan_delay_h')]
    expect(titles(orderFindings(findings, { added: [], removed: [], changed: ['scan_delay_h'] }))).toEqual(['touched', 'untouched', 'no feature'])
  })

  it('lowers only a leading capitalised common word in the headline', () => {
    expect(writeHeadline('warn', [f('group-carried', 'Zone_code is carried by The group.')])).toBe('Passed with warnings: Zone_code is carried by The group.')
    expect(writeHeadline('warn', [f('score-regression', 'Holdout auc got worse.')])).toBe('Passed with warnings: holdout auc got worse.')
    expect(writeHeadline('warn', [f('score-regression', 'Another finding.')])).toBe('Passed with warnings: Another finding.')
  })
})
