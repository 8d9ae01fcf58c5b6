import { describe, expect, it } from 'vitest'
import { decideVerdict, sortFindings, writeHeadline } from '../../../src/core/checks/verdict.ts'
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
