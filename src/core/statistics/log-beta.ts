import { gammaln } from 'simple-statistics'

/**
 * Natural logarithm of the complete beta function, ln B(a, b) = ln Γ(a) + ln Γ(b) − ln Γ(a + b).
 *
 * Why not simple-statistics alone: its `gammaln` (Lanczos, g = 607/128) is accurate to about 1e-15
 * relative, but ln Γ(big) − ln Γ(big + small) cancels: at a = 5e5 the two terms are 6e6 and the
 * difference loses 9 digits (the Student t CDF at large df needs exactly this difference). When
 * max(a, b) >= 10 we therefore write that difference with Stirling's series (Abramowitz & Stegun
 * 1964, §6.1, the asymptotic series of ln Γ with Bernoulli-number coefficients):
 *   ln Γ(B + S) − ln Γ(B) = (B − 1/2)·log1p(S/B) + S·ln(B + S) − S + ω(B + S) − ω(B),
 * with ω(z) = 1/(12z) − 1/(360z³) + 1/(1260z⁵) − 1/(1680z⁷) + 1/(1188z⁹) − 691/(360360z¹¹) + 1/(156z¹³),
 * whose first omitted term is below 1e-16 for z >= 10. Below 10 the three gammaln calls are used.
 *
 * Edges: a and b must be finite and > 0 (RangeError otherwise). Cost: O(1).
 */
export function logBeta(a: number, b: number): number {
  if (!(a > 0 && a < Infinity && b > 0 && b < Infinity)) {
    throw new RangeError(`logBeta needs finite a > 0 and b > 0, got a = ${a}, b = ${b}`)
  }
  const small = Math.min(a, b)
  const big = Math.max(a, b)
  if (big < 10) return gammaln(a) + gammaln(b) - gammaln(a + b)
  const logGammaRatio =
    (big - 0.5) * Math.log1p(small / big) +
    small * Math.log(big + small) -
    small +
    stirlingRemainder(big + small) -
    stirlingRemainder(big)
  return gammaln(small) - logGammaRatio
}

/** ω(z) = ln Γ(z) − [(z − 1/2) ln z − z + ln √(2π)] for z >= 10, by Stirling's series. */
function stirlingRemainder(z: number): number {
  const w = 1 / (z * z)
  return (
    (1 / 12 -
      w * (1 / 360 - w * (1 / 1260 - w * (1 / 1680 - w * (1 / 1188 - w * (691 / 360360 - w / 156)))))) /
    z
  )
}
