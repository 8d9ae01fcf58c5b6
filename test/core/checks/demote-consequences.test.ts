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
