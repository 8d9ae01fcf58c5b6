import { describe, expect, it } from 'vitest'
import { liftEvidence } from '../../../src/core/checks/lift-evidence.ts'
import type { SideResult } from '../../../src/core/checks/side-result.ts'
import type { DropColumnEstimate } from '../../../src/core/importance/drop-column-importance.ts'
import { sideResult, steady } from './side-results.ts'

// Worked examples of the lift evidence (docs/leak-rule.md), every expected value computed by hand
// from the definitions in lift-evidence.ts; no reference library is involved.

const estimate = (mean: number, lower: number, upper: number, extra: Partial<DropColumnEstimate> = {}): DropColumnEstimate => ({
  mean,
  lower,
  upper,
  pairedT: 10,
  pValue: 0.001,
  reseedSd: 0.01,
  isAboveNoise: true,
  perRefit: [mean],
  ...extra,
})

function sides(options: {
  baseLosses?: readonly number[]
  headLosses?: readonly number[]
  headDrop?: DropColumnEstimate
  baseDrop?: DropColumnEstimate
  single?: Readonly<Record<string, number>>
  alone?: number
  baseSeparation?: number
}): { base: SideResult; head: SideResult } {
  const features = { distance_km: steady(0.05), stop_count: steady(0.03) }
  const base: SideResult = {
    ...sideResult({ side: 'base', features, separation: steady(options.baseSeparation ?? 0.8, 0), single: options.single ?? { distance_km: 0.71, stop_count: 0.65 } }),
    ...(options.baseLosses === undefined ? {} : { losses: options.baseLosses }),
    ...(options.baseDrop ? { dropColumns: { followup_score: options.baseDrop } } : {}),
  }
  const head: SideResult = {
    ...sideResult({ features: { ...features, followup_score: steady(0.2) }, single: { followup_score: options.alone ?? 0.9 } }),
    ...(options.headLosses === undefined ? {} : { losses: options.headLosses }),
    dropColumns: options.headDrop ? { followup_score: options.headDrop } : {},
  }
  return { base, head }
}

describe('liftEvidence(name, sides, task)', () => {
  it('measures a new feature against the loss the base model left and against the best existing feature (binary)', () => {
    // Base loss 0.5, head loss 0.3: the candidate removes (0.5 − 0.3) / 0.5 = 40%; without the feature
    // the head loses 0.2 more, 0.2 / 0.5 = 40% of what the base left, 0.2 / 0.01 = 20 reseed SDs.
    // Alone AUC 0.9 against the full base model's 0.8: (0.9 − 0.5) / (0.8 − 0.5) = 4/3; against the
    // best existing single feature (distance_km, 0.71): 0.4 / 0.21.
    const lift = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25) }), 'binary')!
    expect(lift.baseLoss).toBeCloseTo(0.5, 12)
    expect(lift.headLoss).toBeCloseTo(0.3, 12)
    expect(lift.removedShare).toBeCloseTo(0.4, 12)
    expect(lift.dropLoss).toBeCloseTo(0.2, 12)
    expect([lift.dropLower, lift.dropUpper]).toEqual([0.15, 0.25])
    expect(lift.dropInReseedSds).toBeCloseTo(20, 10)
    expect(lift.liftShare).toBeCloseTo(0.4, 12)
    expect(lift.isAboveNoise).toBe(true)
    expect(lift.fullBase).toBeCloseTo(0.8, 12)
    expect(lift.powerAgainstBase).toBeCloseTo(4 / 3, 12)
    expect(lift.bestExisting).toEqual({ name: 'distance_km', separation: 0.71 })
    expect(lift.powerAgainstBest).toBeCloseTo(0.4 / 0.21, 12)
    expect(lift.alone).toBe(0.9)
  })

  it('uses 0 as the trivial score for regression (R²), not 0.5', () => {
    // Alone R² 0.6 against the base model's 0.8: 0.6 / 0.8 = 0.75; against stop_count's 0.4: 1.5.
    const lift = liftEvidence(
      'followup_score',
      sides({ baseLosses: [1, 1], headLosses: [0.5, 0.5], headDrop: estimate(0.4, 0.3, 0.5), alone: 0.6, single: { stop_count: 0.4 } }),
      'regression',
    )!
    expect(lift.powerAgainstBase).toBeCloseTo(0.75, 12)
    expect(lift.powerAgainstBest).toBeCloseTo(1.5, 12)
  })

  it('takes off a changed feature\'s own drop-column loss on the base side, never a negative one', () => {
    // The feature already carried 0.05 on the base: the pull request adds 0.2 − 0.05 = 0.15.
    const changed = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.12, 0.28), baseDrop: estimate(0.05, 0.03, 0.07) }), 'binary')!
    expect(changed.dropLoss).toBeCloseTo(0.15, 12)
    expect(changed.dropLower).toBeCloseTo(0.07, 12)
    expect(changed.dropUpper).toBeCloseTo(0.23, 12)
    expect(changed.liftShare).toBeCloseTo(0.3, 12)
    expect(changed.dropInReseedSds).toBeCloseTo(15, 10)
    // A base loss below zero (the base model did better without it) takes nothing off.
    const negative = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.12, 0.28), baseDrop: estimate(-0.05, -0.07, -0.03) }), 'binary')!
    expect(negative.dropLoss).toBeCloseTo(0.2, 12)
    // Nor does a base estimate without a number (one refit).
    const undefinedBase = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.12, 0.28), baseDrop: estimate(NaN, NaN, NaN) }), 'binary')!
    expect(undefinedBase.dropLoss).toBeCloseTo(0.2, 12)
  })

  it('is not above noise when the base\'s own loss takes the interval down to zero, even if the head\'s estimate was', () => {
    // Head interval [0.04, 0.2] is above zero, but less the base's 0.05 its lower end is −0.01.
    const lift = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.12, 0.04, 0.2), baseDrop: estimate(0.05, 0.03, 0.07) }), 'binary')!
    expect(lift.isAboveNoise).toBe(false)
    // Exactly zero is not above zero either.
    const atZero = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.12, 0.05, 0.2), baseDrop: estimate(0.05, 0.03, 0.07) }), 'binary')!
    expect(atZero.isAboveNoise).toBe(false)
    // And the head's own verdict of noise stands.
    const noisy = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25, { isAboveNoise: false }) }), 'binary')!
    expect(noisy.isAboveNoise).toBe(false)
  })

  it('clips the lift share to [0, 1] and leaves undefined what cannot be divided', () => {
    expect(liftEvidence('followup_score', sides({ baseLosses: [0.1, 0.1], headLosses: [0.05, 0.05], headDrop: estimate(0.3, 0.2, 0.4) }), 'binary')!.liftShare).toBe(1)
    expect(liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.5, 0.5], headDrop: estimate(-0.1, -0.2, 0) }), 'binary')!.liftShare).toBe(0)
    const perfectBase = liftEvidence('followup_score', sides({ baseLosses: [0, 0], headLosses: [0, 0], headDrop: estimate(0.1, 0.05, 0.15) }), 'binary')!
    expect(perfectBase.liftShare).toBeNaN()
    expect(perfectBase.removedShare).toBeNaN()
    const noSpread = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25, { reseedSd: 0 }) }), 'binary')!
    expect(noSpread.dropInReseedSds).toBeNaN()
  })

  it('finds the best existing feature among finite scores other than the feature itself, the first of equals', () => {
    const lift = liftEvidence(
      'followup_score',
      sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25), single: { followup_score: 0.99, depot: NaN, distance_km: 0.71, stop_count: 0.71 } }),
      'binary',
    )!
    expect(lift.bestExisting).toEqual({ name: 'distance_km', separation: 0.71 })
    // An existing best at the trivial score leaves no ratio (not a division by zero).
    const trivial = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25), single: { distance_km: 0.5 } }), 'binary')!
    expect(trivial.powerAgainstBest).toBeNull()
    const below = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25), baseSeparation: 0.45 }), 'binary')!
    expect(below.powerAgainstBase).toBeNull()
    const none = liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25), single: {} }), 'binary')!
    expect(none.bestExisting).toBeNull()
    expect(none.powerAgainstBest).toBeNull()
  })

  it('is null without the head\'s drop-column estimate or either side\'s losses', () => {
    expect(liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headLosses: [0.3, 0.3] }), 'binary')).toBeNull()
    expect(liftEvidence('followup_score', sides({ headLosses: [0.3, 0.3], headDrop: estimate(0.2, 0.15, 0.25) }), 'binary')).toBeNull()
    expect(liftEvidence('followup_score', sides({ baseLosses: [0.5, 0.5], headDrop: estimate(0.2, 0.15, 0.25) }), 'binary')).toBeNull()
  })
})
