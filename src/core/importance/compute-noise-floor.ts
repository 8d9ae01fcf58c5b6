import { normalQuantile } from '../statistics/normal-quantile.ts'
import { sampleStandardDeviation } from '../statistics/sample-standard-deviation.ts'
import { studentTQuantile } from '../statistics/student-t-quantile.ts'
import type { ImportanceEstimate } from './permutation-importance.ts'

/** One feature's importance across reseeded refits of one side. */
export interface FlooredImportance {
  readonly name: string
  readonly members: readonly string[]
  readonly isGroup: boolean
  /** Mean over refits of each refit's mean over draws. */
  readonly mean: number
  /** SD across refits of the per-refit means (ddof 1): the training-noise floor. NaN for one refit. */
  readonly refitSd: number
  /** Pooled within-refit SD of single draws (ddof 1 per refit). NaN for one draw. */
  readonly drawSd: number
  readonly lower: number
  readonly upper: number
  /** The lower bound of the interval is above zero. */
  readonly isAboveFloor: boolean
  readonly perRefit: readonly number[]
}

/**
 * Noise floor of permutation importance from R reseeded refits with K draws each.
 *
 * Each refit's mean over draws varies both because training was reseeded and because the draws are
 * random; the sample variance of those R means estimates the sum (refit variance + draw variance / K),
 * so the interval mean ± t(0.975, R−1)·s/√R covers both (a one-way random-effects layout; see e.g.
 * Montgomery, "Design and Analysis of Experiments", ch. 13). With one refit (a loaded model that
 * cannot be retrained) only draw noise is known: the interval is then the draws' t-interval, which
 * the report states. When the estimates carry a holdout-sampling SE (`rowSe`, for metrics that are
 * means over rows), its 95% normal half-width is added in quadrature, so that a feature the model
 * touches the same way in every refit but that helps only on these particular rows is not mistaken
 * for one it relies on. A feature is above the floor when the interval's lower bound is above zero.
 *
 * `refits[r]` are the estimates of refit r, all in the same unit order (as permutationImportance
 * returns them for the same model features and groups). Cost O(R·K) per feature.
 */
export function computeNoiseFloor(
  refits: readonly (readonly ImportanceEstimate[])[],
  options: { readonly level?: number } = {},
): FlooredImportance[] {
  const level = options.level ?? 0.95
  if (refits.length === 0) throw new RangeError('computeNoiseFloor needs at least one refit')
  const first = refits[0]
  for (const r of refits) {
    if (r.length !== first.length || r.some((u, i) => u.name !== first[i].name)) {
      throw new RangeError('computeNoiseFloor needs the same features in the same order in every refit')
    }
  }
  const refitCount = refits.length
  return first.map((unit, index) => {
    const perRefit = refits.map((r) => r[index].mean)
    const mean = average(perRefit)
    let within = 0
    let withinDf = 0
    for (const r of refits) {
      const d = r[index].draws
      if (d.length < 2) continue
      const m = average(d)
      for (const v of d) within += (v - m) ** 2
      withinDf += d.length - 1
    }
    const drawSd = withinDf > 0 ? Math.sqrt(within / withinDf) : NaN
    let refitSd = NaN
    let lower: number
    let upper: number
    if (refitCount >= 2) {
      refitSd = sampleStandardDeviation(perRefit)
      const half = studentTQuantile(0.5 + level / 2, refitCount - 1) * (refitSd / Math.sqrt(refitCount))
      lower = mean - half
      upper = mean + half
    } else {
      const draws = first[index].draws.length
      const half = draws >= 2 ? studentTQuantile(0.5 + level / 2, draws - 1) * (drawSd / Math.sqrt(draws)) : NaN
      lower = mean - half
      upper = mean + half
    }
    // Holdout sampling: the rows are a sample too. Added in quadrature (normal, 95% two-sided) when
    // the metric is a mean over rows; the mean of the refits' squared SEs (the same rows each time).
    const rowVariances = refits.map((r) => r[index].rowSe).filter((v): v is number => v !== undefined && Number.isFinite(v))
    if (rowVariances.length === refitCount) {
      const rowHalf = normalQuantile(0.5 + level / 2) * Math.sqrt(rowVariances.reduce((s, v) => s + v * v, 0) / refitCount)
      const refitHalf = (upper - lower) / 2
      const half = Number.isFinite(refitHalf) ? Math.hypot(refitHalf, rowHalf) : rowHalf
      lower = mean - half
      upper = mean + half
    }
    return {
      name: unit.name,
      members: unit.members,
      isGroup: unit.isGroup,
      mean,
      refitSd,
      drawSd,
      lower,
      upper,
      isAboveFloor: lower > 0,
      perRefit,
    }
  })
}

function average(values: readonly number[]): number {
  let s = 0
  for (const v of values) s += v
  return s / values.length
}
