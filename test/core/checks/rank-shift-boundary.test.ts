import { describe, expect, it } from 'vitest'
import { checkRankShift } from '../../../src/core/checks/rank-shift.ts'
import { sideResult, steady } from './side-results.ts'

// stop_count moves from rank 3 to rank 1 (two positions) with a change of 0.04 on 0.52, under 8%, so
// only the rank rule can report it; its per-refit values are steady enough to be significant.
const base = sideResult({
  side: 'base',
  features: { distance_km: steady(0.5, 0.002), weight_kg: steady(0.49, 0.002), stop_count: steady(0.48, 0.002), depot: steady(0.3, 0.002) },
})
const head = sideResult({
  side: 'head',
  features: { distance_km: steady(0.5, 0.002), weight_kg: steady(0.49, 0.002), stop_count: steady(0.52, 0.002), depot: steady(0.3, 0.002) },
})
const options = { action: 'warn' as const, falseDiscoveryRate: 0.05, minRelativeChange: 0.2 }

describe('checkRankShift at the min_positions boundary', () => {
  it('reports a significant move of exactly min_positions ranks', () => {
    const { findings, shifts } = checkRankShift(base, head, { ...options, minPositions: 2 })
    expect(shifts.get('stop_count')).toMatchObject({ isSignificant: true, positionsMoved: -2 })
    expect(findings.filter((f) => f.kind === 'rank-shift').map((f) => f.feature)).toEqual(['stop_count'])
  })

  it('does not report it when min_positions is one more than the move', () => {
    const { findings } = checkRankShift(base, head, { ...options, minPositions: 3 })
    expect(findings.filter((f) => f.kind === 'rank-shift')).toEqual([])
  })
})
