import { mean, type SideResult } from './side-result.ts'

/** What a new or changed feature adds, measured against what the base model already had. */
export interface LiftEvidence {
  /** Mean holdout loss (lossOfScore) of the base and head refits. */
  readonly baseLoss: number
  readonly headLoss: number
  /** Share of the base model's remaining loss the candidate removes: (baseLoss − headLoss) / baseLoss. */
  readonly removedShare: number
  /** The feature's drop-column loss on the head (less its drop-column loss on the base when it changed). */
  readonly dropLoss: number
  readonly dropLower: number
  readonly dropUpper: number
  readonly pValue: number
  /** dropLoss over the SD of the head's full-model loss across reseeds. */
  readonly dropInReseedSds: number
  /** The head's drop-column loss is above reseed noise (see dropColumnImportance). */
  readonly isAboveNoise: boolean
  /** dropLoss / baseLoss, clipped to [0, 1]: the share of the base's remaining loss this feature carries. */
  readonly liftShare: number
  /** One-feature AUC / R² on the head, when computed. */
  readonly alone: number | null
  readonly fullBase: number
  /** (alone − trivial) / (full base model − trivial). */
  readonly powerAgainstBase: number | null
  /** (alone − trivial) / (best existing single feature − trivial), the best among the base features measured alone. */
  readonly powerAgainstBest: number | null
  readonly bestExisting: { readonly name: string; readonly separation: number } | null
}

/**
 * Lift evidence of one feature the pull request added or changed, from the two sides' reseeded
 * losses and the head's drop-column refits; null when the head has no drop-column estimate for it
 * (a loaded model, or a feature beyond the budget). Common practice, no single source: a single new
 * feature that removes a large part of the remaining error is the classic sign of a leak.
 */
export function liftEvidence(
  name: string,
  context: { readonly base: SideResult; readonly head: SideResult },
  task: 'binary' | 'regression' | 'multiclass',
): LiftEvidence | null {
  const { base, head } = context
  const drop = head.dropColumns?.[name]
  if (!drop || !base.losses || !head.losses) return null
  const baseDrop = base.dropColumns?.[name]
  const baseLoss = mean(base.losses)
  const headLoss = mean(head.losses)
  const offset = baseDrop && Number.isFinite(baseDrop.mean) ? Math.max(0, baseDrop.mean) : 0
  const dropLoss = drop.mean - offset
  const trivial = task === 'regression' ? 0 : 0.5
  const fullBase = mean(base.separation)
  const alone = head.singleFeatureSeparation[name] ?? null
  let bestExisting: { name: string; separation: number } | null = null
  for (const [feature, separation] of Object.entries(base.singleFeatureSeparation)) {
    if (feature === name || !Number.isFinite(separation)) continue
    if (!bestExisting || separation > bestExisting.separation) bestExisting = { name: feature, separation }
  }
  const ratio = (a: number | null, b: number) => (a === null || !(b - trivial > 0) ? null : (a - trivial) / (b - trivial))
  return {
    baseLoss,
    headLoss,
    removedShare: baseLoss > 0 ? (baseLoss - headLoss) / baseLoss : NaN,
    dropLoss,
    dropLower: drop.lower - offset,
    dropUpper: drop.upper - offset,
    pValue: drop.pValue,
    dropInReseedSds: drop.reseedSd > 0 ? dropLoss / drop.reseedSd : NaN,
    isAboveNoise: drop.isAboveNoise && drop.lower - offset > 0,
    liftShare: baseLoss > 0 ? Math.min(1, Math.max(0, dropLoss / baseLoss)) : NaN,
    alone,
    fullBase,
    powerAgainstBase: ratio(alone, fullBase),
    powerAgainstBest: bestExisting ? ratio(alone, bestExisting.separation) : null,
    bestExisting,
  }
}
