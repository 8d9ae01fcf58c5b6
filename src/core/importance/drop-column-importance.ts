import { sampleStandardDeviation } from 'simple-statistics'
import { studentTCdf } from '../statistics/student-t-cdf.ts'
import { tInterval } from '../statistics/t-interval.ts'

/** One feature's drop-column importance over matched refits. */
export interface DropColumnEstimate {
  /** Mean over refits of (loss without the feature − loss with it), in loss units (positive: the model needs it). */
  readonly mean: number
  /** 95% t interval of `mean` across matched refits (NaN with one refit). */
  readonly lower: number
  readonly upper: number
  /** Paired t statistic and its one-sided p-value (H1: the loss grows without the feature); NaN with one refit. */
  readonly pairedT: number
  readonly pValue: number
  /** SD across refits of the full model's loss: how far a plain reseed moves the loss. */
  readonly reseedSd: number
  /** The interval's lower bound is above zero and the mean loss exceeds one reseed SD. */
  readonly isAboveNoise: boolean
  /** Per refit, loss without − loss with. */
  readonly perRefit: readonly number[]
}

/**
 * Drop-column importance, also called LOCO (leave one covariate out; Lei, G'Sell, Rinaldo,
 * Tibshirani & Wasserman 2018, "Distribution-free predictive inference for regression", JASA
 * 113(523), §6): the model is refitted without the feature and the increase of its holdout loss is
 * the feature's importance. Unlike permutation importance it measures what the model cannot recover
 * from the other features, so a correlated duplicate scores near zero.
 *
 * `fullLosses[r]` and `droppedLosses[r]` are the holdout losses (lower is better) of refit r with and
 * without the feature, fitted with the same derived seed: matched pairs. The differences get a
 * Student t interval and a one-sided paired t-test (the same statistic as scipy.stats.ttest_rel,
 * alternative='greater'). A loss no larger than one reseed SD of the full model's loss, or an
 * interval that reaches zero, is noise.
 *
 * Edges: unequal lengths or no refits are RangeErrors; one refit gives the difference with NaN
 * interval, t and p, and isAboveNoise false (nothing is known of the noise); identical differences
 * give t = ±Infinity (p 0 or 1) or NaN when all are zero (p 1). Cost O(R).
 */
export function dropColumnImportance(fullLosses: readonly number[], droppedLosses: readonly number[], options: { readonly level?: number } = {}): DropColumnEstimate {
  if (fullLosses.length !== droppedLosses.length) {
    throw new RangeError(`dropColumnImportance needs matched refits, got ${fullLosses.length} and ${droppedLosses.length} losses`)
  }
  if (fullLosses.length === 0) throw new RangeError('dropColumnImportance needs at least one refit')
  const perRefit = fullLosses.map((full, r) => droppedLosses[r] - full)
  const n = perRefit.length
  const interval = tInterval(perRefit, { level: options.level ?? 0.95 })
  if (n < 2) {
    return { mean: interval.mean, lower: NaN, upper: NaN, pairedT: NaN, pValue: NaN, reseedSd: NaN, isAboveNoise: false, perRefit }
  }
  const reseedSd = sampleStandardDeviation([...fullLosses])
  const se = interval.sd / Math.sqrt(n)
  const pairedT = se > 0 ? interval.mean / se : interval.mean === 0 ? NaN : interval.mean > 0 ? Infinity : -Infinity
  const pValue = Number.isNaN(pairedT) ? 1 : 1 - studentTCdf(pairedT, n - 1)
  return {
    mean: interval.mean,
    lower: interval.lower,
    upper: interval.upper,
    pairedT,
    pValue,
    reseedSd,
    isAboveNoise: interval.lower > 0 && interval.mean > reseedSd,
    perRefit,
  }
}
