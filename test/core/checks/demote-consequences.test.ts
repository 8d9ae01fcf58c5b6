import { describe, expect, it } from 'vitest'
import { demoteConsequences } from '../../../src/core/checks/demote-consequences.ts'
import type { Finding } from '../../../src/core/report/report.ts'

const finding = (kind: Finding['kind'], severity: Finding['severity'], feature?: string): Finding => ({
  kind,
  severity,
  ...(feature ? { feature } : {}),
  title: `${kind} ${feature ?? ''}`.trim(),
  message: 'Numbers.',
  evidence: {},
})

describe('demoteConsequences(findings)', () => {
  it('turns other features\' rank shifts and the ranking change into info when a leak blocks, saying why', () => {
    const out = demoteConsequences([
      finding('leakage', 'block', 'scan_delay_h'),
      finding('rank-shift', 'warn', 'stop_count'),
      finding('rank-agreement', 'warn'),
      finding('score-regression', 'block'),
    ])
    expect(out.map((f) => f.severity)).toEqual(['block', 'info', 'info', 'block'])
    expect(out[1].message).toBe(
      "Numbers. Likely a consequence of the leakage finding on scan_delay_h: a feature that takes over the model moves every other feature's importance.",
    )
  })
  it('leaves everything as it is without a blocking leak, or when the leak itself only warns', () => {
    const warnOnly = [finding('leakage', 'warn', 'x'), finding('rank-shift', 'warn', 'y')]
    expect(demoteConsequences(warnOnly)).toEqual(warnOnly)
  })
})

describe('demoteConsequences(findings): which findings count as consequences of a blocking leak', () => {
  it('demotes other features’ sensitivity shifts too, but not the leaking feature’s own shifts nor other kinds', () => {
    const out = demoteConsequences([
      finding('rank-shift', 'warn', 'scan_delay_h'),
      finding('sensitivity-shift', 'warn', 'stop_count'),
      finding('sensitivity-shift', 'warn', 'scan_delay_h'),
      finding('leakage', 'block', 'scan_delay_h'),
      finding('floor-drop', 'warn', 'stop_count'),
      finding('rank-agreement', 'info'),
    ])
    expect(out.map((f) => [f.kind, f.feature, f.severity])).toEqual([
      ['rank-shift', 'scan_delay_h', 'warn'],
      ['sensitivity-shift', 'stop_count', 'info'],
      ['sensitivity-shift', 'scan_delay_h', 'warn'],
      ['leakage', 'scan_delay_h', 'block'],
      ['floor-drop', 'stop_count', 'warn'],
      ['rank-agreement', undefined, 'info'],
    ])
    // Only the demoted ones carry the sentence; the rest keep their message unchanged.
    expect(out.map((f) => f.message.endsWith("moves every other feature's importance."))).toEqual([false, true, false, false, false, true])
  })

  it('keeps a consequence that blocks on its own as a block, saying it is likely a consequence', () => {
    const [, shift] = demoteConsequences([finding('leakage', 'block', 'scan_delay_h'), finding('rank-shift', 'block', 'stop_count')])
    expect(shift.severity).toBe('block')
    expect(shift.message).toBe(
      "Numbers. Likely a consequence of the leakage finding on scan_delay_h: a feature that takes over the model moves every other feature's importance.",
    )
  })

  it('returns a copy, not the input array', () => {
    const input = [finding('rank-shift', 'warn', 'y')]
    const out = demoteConsequences(input)
    expect(out).toEqual(input)
    expect(out).not.toBe(input)
  })
})

describe('demoteConsequences: only a blocking leak demotes', () => {
  it('leaves everything as it is after a leak that only warns', () => {
    const findings = [finding('leakage', 'warn', 'scan_delay_h'), finding('rank-shift', 'warn', 'stop_count'), finding('rank-agreement', 'warn')]
    expect(demoteConsequences(findings)).toEqual(findings)
  })
})
