import { InternalError } from '../errors.ts'
import { logBeta } from './log-beta.ts'
import { normalQuantile } from './normal-quantile.ts'
import { regularizedIncompleteBeta } from './regularized-incomplete-beta.ts'
import { studentTCdf } from './student-t-cdf.ts'

/**
 * Quantile (inverse CDF) of Student's t distribution: the t with P(T <= t) = p, for any df > 0,
 * including non-integer df and df = Infinity (normalQuantile).
 *
 * Method: df = 1 and df = 2 have closed forms (t = cot(π q), or tan(π (p − 1/2)) near the centre, and
 * t = (1 − 2q) / sqrt(2q(1 − q)) for the upper tail q; derived from the Cauchy CDF
 * F(t) = 1/2 + arctan(t)/π and from F(t) = 1/2 + t / (2 sqrt(2 + t²)) for df = 2).
 * Otherwise we solve for u = ln|t| by Newton's method safeguarded with bisection (the rtsafe scheme,
 * Press et al., Numerical Recipes, 3rd ed. 2007, §9.4): a bracket is grown by doubling steps in u
 * from a start at the first two terms of the Cornish–Fisher expansion around the normal quantile
 * z (t ≈ z + (z³ + z)/(4 df) + (5z⁵ + 16z³ + 3z)/(96 df²), Abramowitz & Stegun 1964, 26.7.5), then
 * any Newton step that leaves the bracket is replaced by its midpoint, so it always converges.
 * The equation is ln P(T > |t|) = ln q in the tails (q < 1/4), which is nearly linear in u
 * however small q is, and ln P(|T| < |t|) = ln |2p − 1| near the centre, so p close to 1/2 keeps
 * its relative precision. Stops when a step changes |t| by less than a relative 1e-14.
 * simple-statistics has no t quantile.
 *
 * Edges: p = 0 and p = 1 give −Infinity and Infinity, p = 1/2 gives 0; a quantile beyond the
 * largest double is ±Infinity. p outside [0, 1] (or NaN) and df <= 0 (or NaN) are RangeErrors.
 * Cost: typically 5 to 15 t CDF evaluations.
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`studentTQuantile needs p in [0, 1], got ${p}`)
  if (!(df > 0)) throw new RangeError(`studentTQuantile needs degrees of freedom > 0, got ${df}`)
  if (df === Infinity) return normalQuantile(p)
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  if (p === 0.5) return 0
  const sign = p < 0.5 ? -1 : 1
  const q = Math.min(p, 1 - p)
  if (df === 1) return q < 0.25 ? sign / Math.tan(Math.PI * q) : Math.tan(Math.PI * (p - 0.5))
  if (df === 2) return (sign * Math.abs(2 * p - 1)) / Math.sqrt(2 * q * (1 - q))
  return sign * upperQuantile(q, Math.abs(2 * p - 1), df)
}

/** The t > 0 with P(T > t) = q (0 < q < 1/2), where central = 1 − 2q computed without rounding. */
function upperQuantile(q: number, central: number, df: number): number {
  const logDensityConstant = -0.5 * Math.log(df) - logBeta(df / 2, 0.5)
  const isTail = q < 0.25
  const logTarget = Math.log(isTail ? q : central)
  // g(u) increases with u = ln t and is zero at the quantile; slope is dg/du.
  const evaluate = (u: number): { g: number; slope: number } => {
    const t = Math.exp(u)
    const r = t / Math.sqrt(df)
    const logOnePlusR2 = r > 1e150 ? 2 * Math.log(r) : Math.log1p(r * r)
    const logTimesDensity = u + logDensityConstant - ((df + 1) / 2) * logOnePlusR2
    if (isTail) {
      const logTail = Math.log(studentTCdf(-t, df))
      return { g: logTarget - logTail, slope: Math.exp(logTimesDensity - logTail) }
    }
    const logCentral = Math.log(regularizedIncompleteBeta(1 / (1 + 1 / (r * r)), 0.5, df / 2))
    return { g: logCentral - logTarget, slope: 2 * Math.exp(logTimesDensity - logCentral) }
  }

  const z = normalQuantile(1 - q)
  const start = z + (z ** 3 + z) / (4 * df) + (5 * z ** 5 + 16 * z ** 3 + 3 * z) / (96 * df * df)
  const maxU = Math.log(Number.MAX_VALUE)
  let u = Math.min(Math.log(start), maxU)
  let { g, slope } = evaluate(u)
  let lower = -Infinity
  let upper = Infinity
  for (let width = 1; g !== 0; width *= 2) {
    if (g < 0) {
      lower = u
      if (upper < Infinity) break
      if (u === maxU) return Infinity
      u = Math.min(u + width, maxU)
    } else {
      upper = u
      if (lower > -Infinity) break
      u -= width
    }
    ;({ g, slope } = evaluate(u))
  }

  for (let iteration = 0; iteration < 200; iteration++) {
    if (g === 0) return Math.exp(u)
    if (g < 0) lower = u
    else upper = u
    let next = u - g / slope
    if (!(next > lower && next < upper)) next = (lower + upper) / 2
    const change = Math.abs(next - u)
    u = next
    if (change <= 1e-14 || upper - lower <= 1e-14) return Math.exp(u)
    ;({ g, slope } = evaluate(u))
  }
  throw new InternalError(`studentTQuantile: did not converge for q = ${q}, df = ${df}`)
}
