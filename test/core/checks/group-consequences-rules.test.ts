import { describe, expect, it } from 'vitest'
import { groupConsequences } from '../../../src/core/checks/group-consequences.ts'
import type { Finding } from '../../../src/core/report/report.ts'
import { sideResult, steady } from './side-results.ts'

// Each rule of the redistribution finding on hand-built sides (five refits; jitter 0 gives a zero
// reseed SD, so only the 20% relative tolerance applies) and hand-built findings: groupConsequences
// reads only a finding's kind, feature and severity. Every number below is by hand from the module's
// definitions (the 10% strong share and the 2-SD / 20% tolerance are this project's rules of thumb).
const exact = (value: number) => steady(value, 0)
const finding = (kind: Finding['kind'], severity: Finding['severity'], feature?: string): Finding => ({
  kind,
  severity,
  ...(feature ? { feature } : {}),
  title: `${kind} ${feature ?? ''}`.trim(),
  message: '',
  evidence: {},
})
const none = { added: [], removed: [], kindChanged: [] }

describe('groupConsequences: two strong new features, a fall to the floor and a kept consequence', () => {
  // Shared totals 8 + 4 + 0.5 = 12.5 and 4 + 2 + 0.25 = 6.25: factor 0.5, and a, b and c sit exactly at
  // their proportional values. c's head refits spread widely (0.25 ± 2), so it is not above the floor.
  // Head positive total 4 + 2 + 0.25 + 6 + 4 = 16.25: new_scan 6 / 16.25 = 36.9%, new_hub 4 / 16.25 = 24.6%.
  const base = sideResult({ side: 'base', features: { a: exact(8), b: exact(4), c: exact(0.5) } })
  const head = sideResult({ features: { a: exact(4), b: exact(2), c: steady(0.25, 2), new_scan: exact(6), new_hub: exact(4) } })
  const findings = [
    finding('leakage', 'warn', 'new_scan'),
    finding('rank-shift', 'block', 'a'),
    finding('rank-agreement', 'info'),
    finding('rank-shift', 'warn', 'b'),
    finding('floor-drop', 'info', 'c'),
  ]
  it('keeps the unexplained findings in their order and appends one finding in these words, with the worst severity', () => {
    const out = groupConsequences(findings, { base, head }, { added: ['new_scan', 'new_hub'], removed: [], kindChanged: [] })
    expect(head.importances.find((u) => u.name === 'c')!.isAboveFloor).toBe(false)
    expect(out.map((f) => f.title)).toEqual([
      'leakage new_scan',
      'rank-agreement',
      "new_scan, new_hub, new in this pull request, took 36.9%, 24.6% of the head model's importance; 3 features lost share to them in proportion.",
    ])
    expect(out[2]).toEqual({
      kind: 'share-redistribution',
      severity: 'block',
      feature: 'new_scan',
      title: "new_scan, new_hub, new in this pull request, took 36.9%, 24.6% of the head model's importance; 3 features lost share to them in proportion.",
      message:
        "The shared features' total importance went from 12.5 to 6.25 (-50%), and these moved with it, each within 2 reseed SDs or 20% of its proportional value and in the same order: " +
        'a -50%, b -50%, c -50%. 1 of them fell to the noise floor on the way. 1 other shift is not explained by the redistribution and is reported on its own.',
      evidence: {
        cause: 'new_scan, new_hub',
        causeShare: 6 / 16.25,
        direction: 'added',
        featuresExplained: 3,
        fellToFloor: 1,
        sharedTotalBase: 12.5,
        sharedTotalHead: 6.25,
        proportionalFactor: 0.5,
        explained: 'a, b, c',
      },
    })
  })
})

describe('groupConsequences: a strong removed feature', () => {
  // Base: gone holds 9 / 18 = 50%. Shared totals 6 + 3 = 9 and 9 + 4.5 = 13.5: factor 1.5, both at their proportional values.
  const base = sideResult({ side: 'base', features: { a: exact(6), b: exact(3), gone: exact(9) } })
  const head = sideResult({ features: { a: exact(9), b: exact(4.5) } })
  const removed = { added: [], removed: ['gone'], kindChanged: [] }

  it('says the others gained its share, and that no other shift is reported', () => {
    const out = groupConsequences([finding('feature-set', 'info'), finding('rank-shift', 'warn', 'a'), finding('rank-shift', 'info', 'b')], { base, head }, removed)
    expect(out.map((f) => f.kind)).toEqual(['feature-set', 'share-redistribution'])
    expect(out[1]).toMatchObject({
      severity: 'warn',
      feature: 'gone',
      title: "gone, removed in this pull request, held 50% of the base model's importance; 2 features gained its share in proportion.",
      message:
        "The shared features' total importance went from 9 to 13.5 (+50%), and these moved with it, each within 2 reseed SDs or 20% of its proportional value and in the same order: " +
        'a +50%, b +50%. No other shift is reported.',
      evidence: { direction: 'removed', causeShare: 0.5, featuresExplained: 1 + 1, fellToFloor: 0, proportionalFactor: 1.5, explained: 'a, b' },
    })
  })

  it('keeps a shift of the removed feature itself (it has no head value) and a finding without a feature', () => {
    const out = groupConsequences([finding('floor-drop', 'warn', 'gone'), finding('rank-shift', 'warn')], { base, head }, removed)
    expect(out.map((f) => f.title)).toEqual([
      'floor-drop gone',
      'rank-shift',
      "gone, removed in this pull request, held 50% of the base model's importance; no other feature moved in proportion to it.",
    ])
    expect(out[2].message).toBe(
      "The shared features' total importance went from 9 to 13.5 (+50%). 2 other shifts are not explained by the redistribution and are reported on their own.",
    )
  })
})

describe('groupConsequences: what a redistribution does not explain', () => {
  const base = sideResult({ side: 'base', features: { a: exact(5), b: exact(4.9), c: exact(2) } })
  const added = { added: ['new_scan'], removed: [], kindChanged: [] }
  const explained = (out: readonly Finding[]) => out.find((f) => f.kind === 'share-redistribution')?.evidence.explained

  it('keeps a shift that changed the order among shared features, even within the tolerance', () => {
    // Factor (2.45 + 2.5 + 1) / 11.9 = 0.5: a (expected 2.5) and b (expected 2.45) each lie 0.05 from
    // it, but swap places; c keeps its place and its proportional value.
    const head = sideResult({ features: { a: exact(2.45), b: exact(2.5), c: exact(1), new_scan: exact(6) } })
    const out = groupConsequences([finding('rank-shift', 'warn', 'a'), finding('rank-shift', 'warn', 'b'), finding('rank-shift', 'info', 'c')], { base, head }, added)
    expect(explained(out)).toBe('c')
    expect(out.map((f) => f.feature)).toEqual(['a', 'b', 'new_scan'])
  })

  it('keeps a feature that moved against the factor, and one beyond 20% of its proportional value', () => {
    // Head shared total 5.5 + 3 + 1.45 = 9.95 against 11.9: factor 0.836. a rose (5 → 5.5) while the
    // rest fell; b is expected at 4.097 and lies 1.10 below it, beyond 20% (0.82); c is expected at
    // 1.672 and lies 0.22 from it, within 20% (0.33).
    const head = sideResult({ features: { a: exact(5.5), b: exact(3), c: exact(1.45), new_scan: exact(6) } })
    const out = groupConsequences([finding('rank-shift', 'warn', 'a'), finding('rank-shift', 'warn', 'b'), finding('rank-shift', 'warn', 'c')], { base, head }, added)
    expect(explained(out)).toBe('c')
    expect(out.filter((f) => f.kind === 'rank-shift').map((f) => f.feature)).toEqual(['a', 'b'])
  })

  it('widens the tolerance to 2 pooled reseed SDs when the refits spread more than 20% of the value', () => {
    // Factor (2.5 + 2.45 + 1.4) / 11.9 = 0.5336, so c is expected at 1.067 and 1.4 is 0.333 off. With
    // a head refit SD of 0.5·sqrt(0.625) = 0.395 (steady's offsets) the pooled SD is 0.280 and the
    // tolerance 0.559: explained. With no spread the tolerance is 20% of 1.067 = 0.213: kept (the
    // grouped finding then explains no feature).
    const head = sideResult({ features: { a: exact(2.5), b: exact(2.45), c: steady(1.4, 0.5), new_scan: exact(6) } })
    const factor = (2.5 + 2.45 + 1.4) / 11.9
    expect(factor).toBeCloseTo(0.5336, 4)
    const out = groupConsequences([finding('rank-shift', 'warn', 'c')], { base, head }, added)
    expect(explained(out)).toBe('c')
    const tight = sideResult({ features: { a: exact(2.5), b: exact(2.45), c: exact(1.4), new_scan: exact(6) } })
    expect(explained(groupConsequences([finding('rank-shift', 'warn', 'c')], { base, head: tight }, added))).toBe('')
  })

  it('changes nothing when nothing is explained and every shift left is info', () => {
    const head = sideResult({ features: { a: exact(5.5), b: exact(3), c: exact(0.5), new_scan: exact(6) } })
    const findings = [finding('rank-shift', 'info', 'a'), finding('rank-agreement', 'info'), finding('leakage', 'warn', 'new_scan')]
    expect(groupConsequences(findings, { base, head }, added)).toEqual(findings)
  })
})

describe('groupConsequences: which new or removed feature is strong', () => {
  const base = sideResult({ side: 'base', features: { a: exact(6), b: exact(3) } })
  const findings = [finding('rank-shift', 'warn', 'a')]
  const added = { added: ['new_scan'], removed: [], kindChanged: [] }

  it('counts a share of exactly 10% as strong and 9% as not', () => {
    // Head positive totals: 6 + 3 + 1 = 10 (share 0.1) and 6 + 3 + 0.9 = 9.9 (share 0.0909).
    const atLine = sideResult({ features: { a: exact(6), b: exact(3), new_scan: exact(1) } })
    expect(groupConsequences(findings, { base, head: atLine }, added).map((f) => f.kind)).toEqual(['share-redistribution'])
    const below = sideResult({ features: { a: exact(6), b: exact(3), new_scan: exact(0.9) } })
    expect(groupConsequences(findings, { base, head: below }, added)).toEqual(findings)
  })

  it('needs the feature above the noise floor, and a positive shared total on the base', () => {
    const atFloor = sideResult({ features: { a: exact(6), b: exact(3), new_scan: steady(4, 20) } })
    expect(atFloor.importances.find((u) => u.name === 'new_scan')!.isAboveFloor).toBe(false)
    expect(groupConsequences(findings, { base, head: atFloor }, added)).toEqual(findings)
    const flatBase = sideResult({ side: 'base', features: { a: exact(0), b: exact(-0.1) } })
    const head = sideResult({ features: { a: exact(6), b: exact(3), new_scan: exact(4) } })
    expect(groupConsequences(findings, { base: flatBase, head }, added)).toEqual(findings)
    expect(groupConsequences(findings, { base, head }, none)).toEqual(findings)
  })
})
