import { describe, expect, it } from 'vitest'
import { checkSlices, type SliceSides } from '../../../src/core/checks/slice-findings.ts'
import type { FlooredImportance } from '../../../src/core/importance/compute-noise-floor.ts'
import { options, overall, unit } from './slice-context.ts'

const slice = (name: string, base: number[], head: number[], importances = overall): SliceSides => ({
  name,
  definition: 'depot = ringway',
  status: 'measured',
  headRows: 400,
  filterColumns: ['depot'],
  base: { scores: base, importances },
  head: { scores: head, importances },
})

describe('checkSlices', () => {
  it("tests a slice's score one-sided with Welch: AUC 1..5 → 2, 4, .., 10 got better, the reverse worse with p = 0.10753/2", () => {
    // /work/shared check values: Welch x = 1..5 against 2, 4, .., 10, two-sided p = 0.10753119493062728 (SciPy).
    const { findings, changes } = checkSlices([slice('better', [1, 2, 3, 4, 5], [2, 4, 6, 8, 10]), slice('worse', [2, 4, 6, 8, 10], [1, 2, 3, 4, 5])], overall, new Set(), options)
    expect(changes.get('better')!.pValue).toBeCloseTo(1 - 0.10753119493062728 / 2, 12)
    expect(changes.get('worse')!.pValue).toBeCloseTo(0.10753119493062728 / 2, 12)
    expect(changes.get('worse')!.worsening).toBe(3)
    // Benjamini–Hochberg over the two slices: the smaller p times 2/1 = 0.1075 > alpha 0.06, no finding.
    expect(changes.get('worse')!.adjustedPValue).toBeCloseTo(0.10753119493062728, 12)
    expect(findings.filter((f) => f.kind === 'slice-score')).toEqual([])
    const alone = checkSlices([slice('worse', [2, 4, 6, 8, 10], [1, 2, 3, 4, 5])], overall, new Set(), options)
    expect(alone.findings.map((f) => [f.kind, f.severity, f.feature])).toEqual([['slice-score', 'warn', 'worse']])
    expect(alone.findings[0].title).toBe('In the slice worse the holdout auc got worse: 6 → 3.')
  })

  it('leaves the filter column out of the ranking and reports a differing top feature as info', () => {
    const inside = [unit('depot', 0.9), unit('stops', 0.2), unit('distance_km', 0.15)]
    const { findings } = checkSlices([slice('ringway', [0.8, 0.8], [0.8, 0.8], inside)], overall, new Set(), options)
    expect(findings.map((f) => [f.kind, f.severity, f.feature])).toEqual([['slice-top-features', 'info', 'stops']])
  })

  it('reports dominance inside a slice: warn for a touched feature, info otherwise, nothing when off', () => {
    const inside = [unit('scan_flag', 0.6), unit('distance_km', 0.1), unit('stops', 0.05)]
    const withFlag = [...overall, unit('scan_flag', 0.08)]
    const s = slice('harbour', [0.8, 0.8], [0.8, 0.8], inside)
    expect(checkSlices([s], withFlag, new Set(['scan_flag']), options).findings.map((f) => [f.kind, f.severity])).toEqual([['slice-dominance', 'warn']])
    expect(checkSlices([s], withFlag, new Set(), options).findings.map((f) => f.severity)).toEqual(['info'])
    expect(checkSlices([s], withFlag, new Set(['scan_flag']), { ...options, action: 'off' }).findings).toEqual([])
  })

  it('names a slice too small to judge', () => {
    const small: SliceSides = { name: 'longest', definition: 'distance_km ≥ 31', status: 'too-small', headRows: 12, filterColumns: ['distance_km'] }
    expect(checkSlices([small], overall, new Set(), options).findings.map((f) => f.title)).toEqual(['The slice longest was not judged: 12 holdout rows, fewer than 200.'])
  })
})
