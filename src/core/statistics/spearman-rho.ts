import { sampleCorrelation } from 'simple-statistics'
import { midranks } from './midranks.ts'

/**
 * Spearman's rank correlation rho of two paired samples, in [-1, 1]: Pearson's correlation of the
 * mid-ranks (Spearman 1904; with ties as in scipy.stats.spearmanr). The shortcut
 * 1 − 6 Σd² / (n(n² − 1)) is exact only without ties, so it is not used. Ranks come from
 * `midranks`, the correlation from simple-statistics' sampleCorrelation (its own
 * sampleRankCorrelation does the same with 0-based mid-ranks but takes only plain arrays and
 * accepts NaN silently).
 *
 * Edges: samples of different length are a RangeError. Returns NaN for fewer than two pairs, a
 * constant sample, or any NaN (as scipy's nan_policy='propagate'). Rounding can push |rho| a few
 * ulps past 1; the result is clamped to [-1, 1]. Cost: O(n log n).
 */
export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) {
    throw new RangeError(`spearmanRho needs paired samples, got ${x.length} and ${y.length} values`)
  }
  if (x.length < 2) return NaN
  for (let i = 0; i < x.length; i++) if (Number.isNaN(x[i]) || Number.isNaN(y[i])) return NaN
  const rho = sampleCorrelation(Array.from(midranks(x)), Array.from(midranks(y)))
  return Math.max(-1, Math.min(1, rho))
}
