import { describe, expect, it } from 'vitest'
import { checkGroupCarried } from '../../../src/core/checks/group-carried.ts'
import type { FlooredImportance } from '../../../src/core/importance/compute-noise-floor.ts'
import { dropColumnImportance, type DropColumnEstimate } from '../../../src/core/importance/drop-column-importance.ts'

const floored = (name: string, mean: number, isAboveFloor: boolean, members: readonly string[] = [name]): FlooredImportance => ({
  name,
  members,
  isGroup: members.length > 1,
  mean,
  refitSd: 0.01,
  drawSd: 0.01,
  lower: isAboveFloor ? mean - 0.01 : -0.01,
  upper: mean + 0.01,
  isAboveFloor,
  perRefit: [mean, mean, mean],
})

// Full-model losses of three matched refits (reseed SD 0.01 by hand: mean 1, deviations -0.01, 0, 0.01).
const full = [0.99, 1, 1.01]
/** By hand: a drop-column loss of `by` in every refit, plus the same ±0.005 wobble. */
const drop = (by: number): DropColumnEstimate => dropColumnImportance(full, full.map((l, r) => l + by + [-0.005, 0, 0.005][r]))
const group = (mean: number, isAboveFloor: boolean) => floored('x ~ x_copy', mean, isAboveFloor, ['x', 'x_copy'])
const on = { action: 'info' } as const

describe('checkGroupCarried(head, touched, options)', () => {
  it('calls members below half the group permutation importance carried (permutation evidence alone)', () => {
    const findings = checkGroupCarried({ importances: [floored('x', 0.2, true), floored('x_copy', 0.25, true), group(0.6, true)] }, new Set(['x_copy']), on)
    expect(findings).toHaveLength(1)
    expect(findings[0].title).toBe('x and x_copy are carried by their correlated group: x, x_copy.')
    expect(findings[0].message).toBe(
      'Permuted together, x, x_copy change the score by 0.6 (95% interval [0.59, 0.61]); permuted alone, x by 0.2, x_copy by 0.25: ' +
        'the other members stand in for them when they are permuted or left out. x_copy is new or changed here: redundant with the rest of the group, not harmless. Judge the group as one.',
    )
    expect(findings[0].evidence.groupDropColumnLoss).toBeNull()
  })

  it('does not call a member at exactly half the group importance carried by permutation', () => {
    expect(checkGroupCarried({ importances: [floored('x', 0.3, true), floored('x_copy', 0.3, true), group(0.6, true)] }, new Set(), on)).toEqual([])
  })

  it('calls a member with high permutation importance carried when its own drop-column loss is reseed noise and the group one is not', () => {
    // x alone: 0.4 of the group's 0.6 by permutation, but refitting without it loses 0.002 (below the reseed SD 0.01).
    const head = {
      importances: [floored('x', 0.4, true), floored('x_copy', 0.4, true), group(0.6, true)],
      dropColumns: { x: drop(0.002), x_copy: drop(0.5) },
      dropGroups: { 'x ~ x_copy': drop(0.8) },
    }
    const findings = checkGroupCarried(head, new Set(), { action: 'warn' })
    expect(findings).toHaveLength(1)
    expect(findings[0].severity).toBe('warn')
    expect(findings[0].title).toBe('x is carried by its correlated group: x, x_copy.')
    expect(findings[0].message).toBe(
      'Permuted together, x, x_copy change the score by 0.6 (95% interval [0.59, 0.61]); refitted without all of them, the holdout loss grows by 0.8 (95% interval [0.7876, 0.8124]); ' +
        'permuted alone, x by 0.4; refitted without one at a time, x by 0.002 (within reseed noise): the other members stand in for it when it is permuted or left out. Judge the group as one.',
    )
    // By hand: differences 0.795, 0.8, 0.805 (SD 0.005), t(0.975, 2) = 4.303 (handbook t table): 0.8 ± 0.01242.
    expect(findings[0].evidence).toMatchObject({ groupDropColumnAboveNoise: true, membersDropColumnWithinNoise: 1 })
    expect(findings[0].evidence.groupDropColumnLoss as number).toBeCloseTo(0.8, 12)
  })

  it('finds a group that matters only by its drop-column loss, and its members not above the floor alone carried', () => {
    const head = {
      importances: [floored('x', 0.001, false), floored('x_copy', 0.002, false), group(0.003, false)],
      dropGroups: { 'x ~ x_copy': drop(0.8) },
    }
    const findings = checkGroupCarried(head, new Set(['x_copy']), on)
    expect(findings.map((f) => f.title)).toEqual(['x and x_copy are carried by their correlated group: x, x_copy.'])
  })

  it('reports nothing when neither the group permutation nor the group drop-column loss is above noise, or the check is off', () => {
    const quiet = { importances: [floored('x', 0.001, false), floored('x_copy', 0.002, false), group(0.003, false)], dropGroups: { 'x ~ x_copy': drop(0.004) } }
    expect(checkGroupCarried(quiet, new Set(), on)).toEqual([])
    expect(checkGroupCarried({ importances: [floored('x', 0.2, true), floored('x_copy', 0.25, true), group(0.6, true)] }, new Set(), { action: 'off' })).toEqual([])
  })

  it('does not call a member carried whose own drop-column loss is above noise and permutation importance high', () => {
    const head = {
      importances: [floored('x', 0.4, true), floored('x_copy', 0.4, true), group(0.6, true)],
      dropColumns: { x: drop(0.5), x_copy: drop(0.5) },
      dropGroups: { 'x ~ x_copy': drop(0.8) },
    }
    expect(checkGroupCarried(head, new Set(), on)).toEqual([])
  })
})
