import { describe, expect, it } from 'vitest'
import { checkSlices, type SliceSides } from '../../../src/core/checks/slice-findings.ts'
import type { FlooredImportance } from '../../../src/core/importance/compute-noise-floor.ts'
import { options, overall, unit } from './slice-context.ts'

// The slice findings in their words and at their edges. Welch values from scipy.stats.ttest_ind
// (equal_var=False, one-sided alternative), SciPy 1.10.1.
const measured = (name: string, base: number[] | null, head: number[] | null, headImportances: FlooredImportance[] = overall): SliceSides => ({
  name,
  definition: 'depot = ringway',
  status: 'measured',
  headRows: 400,
  filterColumns: ['depot'],
  ...(base ? { base: { scores: base, importances: overall } } : {}),
  ...(head ? { head: { scores: head, importances: headImportances } } : {}),
})
const none = new Set<string>()

describe('checkSlices: the slice score', () => {
  it('reports a worsening in these words: t = 7.745966692414869, p = 0.002398999849563981 (one slice, so adjusted p = p)', () => {
    const { findings, changes } = checkSlices([measured('ringway', [0.8, 0.82, 0.78], [0.7, 0.71, 0.69])], overall, none, options)
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'slice-score',
      severity: 'warn',
      feature: 'ringway',
      title: 'In the slice ringway the holdout auc got worse: 0.8 → 0.7.',
      message:
        "On the 400 holdout rows where depot = ringway, the auc of the head's refits is worse than the base's by 0.1 " +
        '(one-sided Welch t = 7.746, df 2.941, p = 0.002399, Benjamini–Hochberg adjusted over 1 slices p = 0.002399, against 0.06).',
      evidence: { slice: 'ringway', rows: 400 },
    })
    expect(findings[0].evidence.welchT as number).toBeCloseTo(7.745966692414869, 10)
    expect((findings[0].evidence.pValue as number) / 0.002398999849563981).toBeCloseTo(1, 6)
    expect(changes.get('ringway')!.adjustedPValue).toBe(changes.get('ringway')!.pValue)
    expect(changes.get('ringway')!.worsening).toBeCloseTo(0.1, 12)
  })

  it('reads a rise as worse for a lower-is-better metric, and takes the policy action', () => {
    // Log-loss 0.4 → 0.5: one-sided p = 0.00012760837472096333 (alternative='less').
    const lossOptions = { ...options, metric: 'log-loss', higherIsBetter: false, action: 'block' as const }
    const { findings, changes } = checkSlices([measured('ringway', [0.4, 0.41, 0.39], [0.5, 0.51, 0.49])], overall, none, lossOptions)
    expect(findings.map((f) => [f.kind, f.severity])).toEqual([['slice-score', 'block']])
    expect((changes.get('ringway')!.pValue as number) / 0.00012760837472096333).toBeCloseTo(1, 6)
    // The improvement direction for a loss: p near 1, no finding.
    const better = checkSlices([measured('ringway', [0.5, 0.51, 0.49], [0.4, 0.41, 0.39])], overall, none, lossOptions)
    expect(better.findings).toEqual([])
    expect(better.changes.get('ringway')!.pValue).toBeCloseTo(1 - 0.00012760837472096333, 10)
  })

  it('compares only slices with two refits a side; without any spread a worsening is exact (p = 0), no change is p = 0.5', () => {
    const { findings, changes } = checkSlices(
      [measured('one', [0.8], [0.7]), measured('nobase', null, [0.7, 0.7]), measured('flat', [0.75, 0.75], [0.5, 0.5]), measured('still', [0.75, 0.75], [0.75, 0.75])],
      overall,
      none,
      options,
    )
    expect([...changes.keys()]).toEqual(['flat', 'still'])
    expect(changes.get('flat')).toEqual({ worsening: 0.25, pValue: 0, adjustedPValue: 0 })
    expect(changes.get('still')).toMatchObject({ worsening: 0, pValue: 0.5 })
    expect(findings.filter((f) => f.kind === 'slice-score').map((f) => f.feature)).toEqual(['flat'])
  })

  it('uses the level inclusively: an adjusted p equal to alpha still counts', () => {
    // One slice: the adjusted p is its p, 0.05376559746531359 (scipy.stats.ttest_ind, alternative='greater').
    const slices = [measured('ringway', [2, 4, 6, 8, 10], [1, 2, 3, 4, 5])]
    const p = checkSlices(slices, overall, none, options).changes.get('ringway')!.adjustedPValue
    expect(p / 0.05376559746531359).toBeCloseTo(1, 8)
    const [at] = checkSlices(slices, overall, none, { ...options, alpha: p }).findings
    expect(at).toMatchObject({ kind: 'slice-score' })
    expect(checkSlices([measured('ringway', [2, 4, 6, 8, 10], [1, 2, 3, 4, 5])], overall, none, { ...options, alpha: 0.0537 }).findings).toEqual([])
  })
})

describe('checkSlices: slices not judged', () => {
  it('says why, in these words', () => {
    const small: SliceSides = { name: 'longest', definition: 'distance_km ≥ 31', status: 'too-small', headRows: 12, filterColumns: ['distance_km'] }
    const oneClass: SliceSides = { name: 'harbour', definition: 'depot = harbour', status: 'one-class', headRows: 230, filterColumns: ['depot'] }
    expect(checkSlices([small, oneClass], overall, none, options).findings).toEqual([
      {
        kind: 'slice-too-small',
        severity: 'info',
        feature: 'longest',
        title: 'The slice longest was not judged: 12 holdout rows, fewer than 200.',
        message: 'Slice longest (distance_km ≥ 31). A score and importances on so few rows would be mostly noise; lower checks.slices.min_rows or widen the filter.',
        evidence: { slice: 'longest', rows: 12, minRows: 200 },
      },
      {
        kind: 'slice-too-small',
        severity: 'info',
        feature: 'harbour',
        title: 'The slice harbour was not judged: its 230 holdout rows hold one class only.',
        message: 'Slice harbour (depot = harbour). Scores and importances need rows of both classes.',
        evidence: { slice: 'harbour', rows: 230, minRows: 200 },
      },
    ])
  })

  it('finds nothing at all when the check is off', () => {
    const small: SliceSides = { name: 'longest', definition: 'distance_km ≥ 31', status: 'too-small', headRows: 12, filterColumns: [] }
    const result = checkSlices([small, measured('ringway', [0.8, 0.82, 0.78], [0.7, 0.71, 0.69])], overall, none, { ...options, action: 'off' })
    expect(result.findings).toEqual([])
    expect(result.changes.size).toBe(0)
  })
})

describe('checkSlices: what the model leans on inside a slice', () => {
  const withFlag = [...overall, unit('scan_flag', 0.08)]
  const same = [0.8, 0.8]

  it('reports dominance in these words, with the runner-up ratio', () => {
    // Inside: 0.625 of 0.625 + 0.125 + 0.0625 = 76.9%, ratio 5; overall 0.08 of 0.43 = 18.6%.
    const inside = [unit('scan_flag', 0.625), unit('distance_km', 0.125), unit('stops', 0.0625)]
    const [finding] = checkSlices([measured('harbour', same, same, inside)], withFlag, new Set(['scan_flag']), options).findings
    expect(finding).toEqual({
      kind: 'slice-dominance',
      severity: 'warn',
      feature: 'scan_flag',
      title: 'Inside the slice harbour, scan_flag carries the model: 76.9% of the importance there, 18.6% overall.',
      message:
        "On the 400 holdout rows where depot = ringway, scan_flag's importance is 0.625 (5 times the runner-up distance_km). " +
        'A feature that matters this much in one part of the data only can be a leak or a shortcut confined to it; check how it is computed there.',
      evidence: { slice: 'harbour', rows: 400, share: 0.625 / 0.8125, runnerUpRatio: 5, overallShare: 0.08 / (0.2 + 0.1 + 0.05 + 0.08), touched: true },
    })
  })

  it('says "far above" when the runner-up has no positive importance, and names none when there is none', () => {
    const inside = [unit('scan_flag', 0.6), unit('distance_km', -0.01)]
    const [finding] = checkSlices([measured('harbour', same, same, inside)], withFlag, none, options).findings
    expect(finding).toMatchObject({ kind: 'slice-dominance', severity: 'info', evidence: { share: 1, runnerUpRatio: null } })
    expect(finding.message).toMatch(/^On the 400 holdout rows where depot = ringway, scan_flag's importance is 0\.6 \(far above the runner-up distance_km\)\. /)
    const [alone] = checkSlices([measured('harbour', same, same, [unit('scan_flag', 0.6)])], overall, none, options).findings
    expect(alone.message).toMatch(/\(far above the runner-up\)\. /)
    // A feature the overall ranking does not hold counts as 0% overall.
    expect(alone.evidence.overallShare).toBe(0)
  })

  it('draws the share and ratio lines inclusively, and leaves out a feature that dominates overall too', () => {
    // Share 0.75 / 1 with ratio 3 exactly (0.75 / 0.25): dominance.
    const atLines = [unit('scan_flag', 0.75), unit('distance_km', 0.25)]
    expect(checkSlices([measured('harbour', same, same, atLines)], withFlag, none, options).findings.map((f) => f.kind)).toEqual(['slice-dominance'])
    const belowRatio = [unit('scan_flag', 0.75), unit('distance_km', 0.26)]
    expect(checkSlices([measured('harbour', same, same, belowRatio)], withFlag, none, options).findings.map((f) => f.kind)).toEqual(['slice-top-features'])
    // distance_km holds 0.2 / 0.35 = 57% overall: dominant everywhere, so neither dominance nor a differing top.
    const distance = [unit('distance_km', 0.6), unit('stops', 0.1)]
    expect(checkSlices([measured('harbour', same, same, distance)], overall, none, options).findings).toEqual([])
    // At exactly 50% overall it is dominant overall (the line is inclusive): no slice finding either.
    const half = [unit('distance_km', 0.5), unit('stops', 0.3), unit('rain_mm', 0.2)]
    expect(checkSlices([measured('harbour', same, same, distance)], half, none, options).findings).toEqual([])
  })

  it('reports a differing top feature in these words, leaving groups and the filter columns out of the ranking', () => {
    const inside = [unit('route', 5, true, true), unit('depot', 0.9), unit('stops', 0.2), unit('distance_km', 0.15)]
    const [finding] = checkSlices([measured('ringway', same, same, inside)], overall, none, options).findings
    expect(finding).toEqual({
      kind: 'slice-top-features',
      severity: 'info',
      feature: 'stops',
      title: 'Inside the slice ringway the model leans most on stops; overall it leans most on distance_km.',
      message:
        "On the 400 holdout rows where depot = ringway the head model's top feature is stops (importance 0.2); over the whole holdout it is distance_km. " +
        'Not a problem in itself: it says where the model works differently.',
      evidence: { slice: 'ringway', rows: 400, importance: 0.2 },
    })
  })

  it('says nothing when the top feature is at the floor, nothing is positive, or the head was not measured', () => {
    expect(checkSlices([measured('ringway', same, same, [unit('stops', 0.2, false), unit('distance_km', 0.1)])], overall, none, options).findings).toEqual([])
    expect(checkSlices([measured('ringway', same, same, [unit('stops', 0), unit('distance_km', -0.1)])], overall, none, options).findings).toEqual([])
    expect(checkSlices([measured('ringway', same, null)], overall, none, options).findings).toEqual([])
    expect(checkSlices([measured('ringway', same, same, [])], overall, none, options).findings).toEqual([])
    // The same top feature as overall: nothing to say.
    expect(checkSlices([measured('ringway', same, same, [unit('distance_km', 0.3), unit('stops', 0.2)])], overall, none, options).findings).toEqual([])
  })
})
