import { logBeta } from './log-beta.ts'
import { normalCdf } from './normal-cdf.ts'
import { regularizedIncompleteBeta } from './regularized-incomplete-beta.ts'

/**
 * Cumulative distribution function of Student's t distribution, P(T <= t), for any df > 0,
 * including non-integer df (Welch–Satterthwaite) and df = Infinity (the standard normal).
 *
 * Method: with x = df / (df + t²), the two-sided tail is P(|T| > |t|) = I_x(df/2, 1/2)
 * (Press et al., Numerical Recipes, 3rd ed. 2007, §6.4, Student's distribution). Near t = 0
 * (|t| below about √3) we use the complement 1 − I_{1−x}(1/2, df/2) instead, computing
 * 1 − x = t²/(df + t²) directly so small |t| does not lose digits. The lower tail (t < 0) is
 * returned directly, so P(T <= −|t|) keeps its relative accuracy however small it is; for t > 0
 * the result is 1 − (lower tail). Two-sided p-values should therefore be 2 · studentTCdf(−|t|, df).
 * Measured against mpmath at 50 digits: relative error below 1e-14 for df <= 30, growing
 * roughly as 1e-16 · df where t² is small next to df (6e-11 at df = 1e6, t = −3), because
 * x = df / (df + t²) is then within t²/df of 1; use df = Infinity for the normal limit.
 * Where x < 1e-300 the leading term of the incomplete beta series is used with ln x = ln df − 2 ln|t|,
 * so heavy tails (df below 2) stay right at |t| far beyond 1e150.
 * simple-statistics has only a t statistic (tTest, tTestTwoSample), not its distribution.
 *
 * Edges: t = ±Infinity give 1 and 0; NaN t gives NaN; df must be > 0 (NaN, 0, negative are a
 * RangeError). Cost: one incomplete beta, O(sqrt(df)) continued-fraction terms at worst.
 */
export function studentTCdf(t: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`studentTCdf needs degrees of freedom > 0, got ${df}`)
  if (Number.isNaN(t)) return NaN
  if (df === Infinity) return normalCdf(t)
  // P(T <= −|t|) = I_x(df/2, 1/2) / 2 with x = df / (df + t²). Past the point where that continued
  // fraction would switch sides, use the complement 1/2 − I_y(1/2, df/2) / 2 with y = 1 − x
  // computed directly, so neither call loses the small argument to rounding.
  const ratio = (t * t) / df
  const x = 1 / (1 + ratio)
  let lowerTail: number
  if (ratio > 1e300) {
    // x below 1e-300 (or t² overflowing): the series' leading term x^a / (a B(a, 1/2)) is exact
    // to double precision, and taking ln x as ln df − 2 ln|t| keeps heavy tails (df < 2) alive.
    const logX = Math.log(df) - 2 * Math.log(Math.abs(t))
    lowerTail = Math.exp((df / 2) * logX - Math.log(df / 2) - logBeta(df / 2, 0.5)) / 2
  } else if (x < (df / 2 + 1) / (df / 2 + 2.5)) {
    lowerTail = regularizedIncompleteBeta(x, df / 2, 0.5) / 2
  } else {
    lowerTail = 0.5 - regularizedIncompleteBeta(ratio / (1 + ratio), 0.5, df / 2) / 2
  }
  return t < 0 ? lowerTail : 1 - lowerTail
}
