import { describe, expect, it } from 'vitest'
import { groupConsequences } from '../../../src/core/checks/group-consequences.ts'
import { checkRankShift } from '../../../src/core/checks/rank-shift.ts'
import { orderFindings } from '../../../src/core/checks/verdict.ts'
import type { Finding } from '../../../src/core/report/report.ts'
import { sideResult, steady } from './side-results.ts'

const shiftOptions = { action: 'warn' as const, falseDiscoveryRate: 0.05, minPositions: 2, minRelativeChange: 0.2 }

// A courier base model and a head that adds one strong feature: every old feature keeps 60% of its
// importance, except stop_count, which gains (and stays below depot).
const base = sideResult({
  side: 'base',
  features: { distance_km: steady(10, 0.1), promised_window_h: steady(6, 0.1), depot: steady(3, 0.1), stop_count: steady(1, 0.05) },
})
const head = sideResult({
  features: {
    distance_km: steady(6, 0.1),
    promised_window_h: steady(3.6, 0.1),
    depot: steady(1.8, 0.1),
    stop_count: steady(1.4, 0.05),
    scan_delay_h: steady(10, 0.1),
  },
})
const featureSet = { added: ['scan_delay_h'], removed: [], kindChanged: [] }

describe('groupConsequences(findings, sides, featureSet)', () => {
  // Computed inside each test (not at collection), so that a fault in the checks fails a test.
  const shiftsOf = () => checkRankShift(base, head, shiftOptions).findings
  const groupedOf = () => groupConsequences(shiftsOf(), { base, head }, featureSet)

  it('replaces the shifts a strong new feature explains by one finding that names it, in these words', () => {
    // Shared total: base 10 + 6 + 3 + 1 = 20, head 6 + 3.6 + 1.8 + 1.4 = 12.8 (-36%); factor 0.64, so
    // distance_km is expected at 6.4 and lies 0.4 from it, within 20% (1.28). scan_delay_h's share of
    // the head's positive importance: 10 / 22.8 = 43.86%.
    const group = groupedOf().find((f) => f.kind === 'share-redistribution')!
    expect(group).toMatchObject({
      severity: 'warn',
      feature: 'scan_delay_h',
      title: "scan_delay_h, new in this pull request, took 43.9% of the head model's importance; 3 features lost share to it in proportion.",
      message:
        "The shared features' total importance went from 20 to 12.8 (-36%), and these moved with it, each within 2 reseed SDs or 20% of its proportional value and in the same order: " +
        'distance_km -40%, promised_window_h -40%, depot -40%. 1 other shift is not explained by the redistribution and is reported on its own.',
    })
  })

  it('keeps a feature that gains while the new one takes credit as its own finding', () => {
    expect(groupedOf().filter((f) => f.kind === 'rank-shift').map((f) => f.feature)).toEqual(['stop_count'])
  })

  it('leads the shifts it does not explain when none is in proportion, so the headline names the cause', () => {
    // distance_km keeps its value while the others fall unevenly: no common factor explains them. The
    // new feature's share: 10 / (10 + 1 + 2.5 + 0.3 + 10) = 42.02%.
    const uneven = sideResult({
      features: { distance_km: steady(10, 0.1), promised_window_h: steady(1, 0.1), depot: steady(2.5, 0.1), stop_count: steady(0.3, 0.05), scan_delay_h: steady(10, 0.1) },
    })
    const shifts = checkRankShift(base, uneven, shiftOptions).findings
    const out = groupConsequences(shifts, { base, head: uneven }, featureSet)
    const cause = out.find((f) => f.kind === 'share-redistribution')!
    expect(cause.severity).toBe('warn')
    expect(cause.title).toBe("scan_delay_h, new in this pull request, took 42% of the head model's importance; no other feature moved in proportion to it.")
    expect(orderFindings(out, { added: ['scan_delay_h'], removed: [], changed: [] })[0]).toBe(cause)
  })

  it('changes nothing without a strong added or removed feature', () => {
    const shifts = shiftsOf()
    expect(groupConsequences(shifts, { base, head }, { added: [], removed: [], kindChanged: [] })).toEqual(shifts)
  })
})

describe('orderFindings(findings, change)', () => {
  const f = (kind: Finding['kind'], severity: Finding['severity'], feature: string | undefined, evidence: Finding['evidence'] = {}): Finding => ({
    kind,
    severity,
    ...(feature ? { feature } : {}),
    title: `${kind} ${feature ?? ''}`.trim(),
    message: '',
    evidence,
  })
  it('puts severity first, then what the pull request touched, then the cause before effects, then the larger evidence; never column order', () => {
    const findings = [
      f('rank-shift', 'warn', 'a_first_column', { baseMean: 1, headMean: 0.9, baseRefitSd: 0.01, headRefitSd: 0.01 }),
      f('rank-shift', 'warn', 'b_column', { baseMean: 1, headMean: 0.5, baseRefitSd: 0.01, headRefitSd: 0.01 }),
      f('share-redistribution', 'warn', 'scan_delay_h', { causeShare: 0.3 }),
      f('feature-set', 'info', undefined),
      f('leakage', 'block', 'scan_delay_h'),
      f('rank-agreement', 'warn', undefined),
    ]
    const ordered = orderFindings(findings, { added: ['scan_delay_h'], removed: [], changed: [] }).map((x) => x.title)
    expect(ordered).toEqual([
      'leakage scan_delay_h',
      'share-redistribution scan_delay_h',
      'rank-shift b_column',
      'rank-shift a_first_column',
      'rank-agreement',
      'feature-set',
    ])
  })
})
