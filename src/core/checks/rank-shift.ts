import type { Finding, FeatureRow } from '../report/report.ts'
import { benjaminiHochberg } from '../statistics/benjamini-hochberg.ts'
import { welchTTest } from '../statistics/welch-t-test.ts'
import type { CheckAction } from './check-action.ts'
import { formatChange, formatNumber as fmt, formatPStatement } from '../report/format-number.ts'
import { rankKey, sideRanks, type SideResult } from './side-result.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

export interface RankShiftOptions {
  readonly action: CheckAction
  /** Benjamini–Hochberg level over all features tested. */
  readonly falseDiscoveryRate: number
  /** A significant shift counts when the feature moves at least this many positions... */
  readonly minPositions: number
  /** ...or when its importance changes by at least this fraction of the larger of the two means. */
  readonly minRelativeChange: number
}

export type Shift = NonNullable<FeatureRow['shift']>

/**
 * Per-feature rank shifts beyond reseed noise.
 *
 * For each feature (and group) on both sides, Welch's t-test compares the per-refit importances of
 * the base refits with those of the head refits (with one refit per side, a loaded model, the
 * per-draw values of that refit: draw noise only). The p-values are adjusted by Benjamini–Hochberg
 * (1995) over all units tested; a unit with a single value on a side (one refit of one draw) cannot
 * be tested and gets NaN t, df and p, never a finding. A shift is reported when it is significant at the policy's false
 * discovery rate, the feature is above the noise floor on at least one side, and it either moves at
 * least `minPositions` ranks among such features or changes by at least `minRelativeChange` of the
 * larger mean (so a top feature that halves but stays first is still seen). Ranks among features
 * indistinguishable from zero on both sides are not compared.
 *
 * Also reports, as info, features that were above the floor on the base side and fell to it.
 */
export function checkRankShift(
  base: SideResult,
  head: SideResult,
  options: RankShiftOptions,
): { findings: Finding[]; shifts: Map<string, Shift> } {
  const baseByName = new Map(base.importances.map((u) => [u.name, u]))
  const pairs: { name: string; isGroup: boolean; b: FlooredImportance; h: FlooredImportance; bi: number; hi: number }[] = []
  head.importances.forEach((h, hi) => {
    const b = baseByName.get(h.name)
    if (b && b.isGroup === h.isGroup) pairs.push({ name: h.name, isGroup: h.isGroup, b, h, bi: base.importances.indexOf(b), hi })
  })

  // One refit with one draw (refits: 1, draws: 1, or a loaded model with draws: 1) leaves a single
  // value per side: no test is possible, so t, df and p are NaN and the unit is not significant.
  const isTestable = pairs.map((p) => samples(base, p.bi).length >= 2 && samples(head, p.hi).length >= 2)
  const tests = pairs.map((p, index) =>
    isTestable[index] ? welchTTest(samples(base, p.bi), samples(head, p.hi)) : { t: NaN, df: NaN, pValue: NaN },
  )
  const adjustedTestable = benjaminiHochberg(tests.filter((_, index) => isTestable[index]).map((t) => t.pValue))
  let nextAdjusted = 0
  const adjusted = isTestable.map((testable) => (testable ? adjustedTestable[nextAdjusted++] : NaN))

  const compared = pairs.filter((p) => !p.isGroup && (p.b.isAboveFloor || p.h.isAboveFloor))
  const baseRank = rankWithin(compared.map((p) => p.b))
  const headRank = rankWithin(compared.map((p) => p.h))

  // Words use each side's own rank, the one the report's table shows.
  const baseSideRank = sideRanks(base.importances)
  const headSideRank = sideRanks(head.importances)

  const shifts = new Map<string, Shift>()
  const findings: Finding[] = []
  pairs.forEach((p, index) => {
    const test = tests[index]
    const isCompared = baseRank.has(p.name)
    const positionsMoved = isCompared ? headRank.get(p.name)! - baseRank.get(p.name)! : null
    const difference = p.h.mean - p.b.mean
    const larger = Math.max(Math.abs(p.b.mean), Math.abs(p.h.mean))
    const relativeChange = larger > 0 ? Math.abs(difference) / larger : 0
    const isSignificant = adjusted[index] <= options.falseDiscoveryRate
    shifts.set(p.name, {
      meanDifference: difference,
      welchT: test.t,
      welchDf: test.df,
      pValue: test.pValue,
      adjustedPValue: adjusted[index],
      isSignificant,
      positionsMoved,
    })
    const movesEnough =
      (positionsMoved !== null && Math.abs(positionsMoved) >= options.minPositions) ||
      relativeChange >= options.minRelativeChange
    if (options.action !== 'off' && isSignificant && isCompared && movesEnough) {
      const direction = difference > 0 ? 'rose' : 'fell'
      const fromRank = baseSideRank.get(rankKey(p))!
      const toRank = headSideRank.get(rankKey(p))!
      const rank = fromRank === toRank ? `still rank ${fromRank}` : `rank ${fromRank} → ${toRank}`
      findings.push({
        kind: 'rank-shift',
        severity: options.action,
        feature: p.name,
        title: `${p.name}'s importance ${direction} from ${fmt(p.b.mean)} to ${fmt(p.h.mean)} (${formatChange(p.b.mean, p.h.mean)}; ${rank}).`,
        message:
          `Across ${samples(base, p.bi).length} base and ${samples(head, p.hi).length} head refits the change is beyond reseed noise: ` +
          `Welch's t = ${fmt(test.t)} (df ${fmt(test.df)}), ${formatPStatement('p', test.pValue)}, ${formatPStatement('Benjamini–Hochberg adjusted p', adjusted[index])} ` +
          `against a false discovery rate of ${options.falseDiscoveryRate}. Reseed noise (refit SD) is ${fmt(p.b.refitSd)} on the base side and ${fmt(p.h.refitSd)} on the head.`,
        evidence: {
          baseMean: p.b.mean,
          headMean: p.h.mean,
          relativeChange,
          baseRefitSd: p.b.refitSd,
          headRefitSd: p.h.refitSd,
          welchT: test.t,
          welchDf: test.df,
          pValue: test.pValue,
          adjustedPValue: adjusted[index],
          baseRank: fromRank,
          headRank: toRank,
        },
      })
    }
    // Only a fall is a fall to the floor: a rise with a wider interval is not.
    if (!p.isGroup && p.b.isAboveFloor && !p.h.isAboveFloor && difference < 0) {
      findings.push({
        kind: 'floor-drop',
        severity: 'info',
        feature: p.name,
        title: `${p.name} fell to the noise floor: importance ${fmt(p.b.mean)} on the base side, ${fmt(p.h.mean)} on the head (${formatChange(p.b.mean, p.h.mean)}).`,
        message: `On the head side the 95% interval of ${p.name}'s importance [${fmt(p.h.lower)}, ${fmt(p.h.upper)}] does not lie above zero: the candidate model no longer measurably relies on it.`,
        evidence: { baseMean: p.b.mean, headMean: p.h.mean, headLower: p.h.lower, headUpper: p.h.upper },
      })
    }
  })
  return { findings, shifts }
}

/** Per-refit means, or with a single refit its per-draw values. */
function samples(side: SideResult, index: number): readonly number[] {
  if (side.perRefit.length >= 2) return side.perRefit.map((r) => r[index].mean)
  return side.perRefit[0][index].draws
}

function rankWithin(units: readonly FlooredImportance[]): Map<string, number> {
  return new Map(rankByValue(units, (u) => u.mean).map((u, i) => [u.name, i + 1]))
}
