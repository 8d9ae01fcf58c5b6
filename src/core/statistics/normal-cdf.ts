import { regularizedIncompleteGamma } from './regularized-incomplete-gamma.ts'

/**
 * Standard normal cumulative distribution function Φ(z) = P(Z <= z).
 *
 * Method: Φ(z) = Q(1/2, z²/2) / 2 for z < 0 and 1/2 + P(1/2, z²/2) / 2 for z >= 0, with P and Q
 * the regularized incomplete gamma functions (erf(u) = P(1/2, u²); Abramowitz & Stegun 1964, 7.1 and
 * 6.5). The lower tail keeps about 15 significant digits down to Φ(−37.5) ≈ 4.6e-308, so small
 * p-values stay accurate. simple-statistics' cumulativeStdNormalProbability reads a 4-decimal
 * table (it gives 0.001 at z = −8, where Φ is 6.2e-16), too coarse for p-values.
 *
 * Edges: ±Infinity give 1 and 0; NaN gives NaN (a NaN statistic stays visible). Cost: a few dozen
 * series or continued-fraction terms.
 */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) return NaN
  const { lower, upper } = regularizedIncompleteGamma(0.5, (z * z) / 2)
  return z < 0 ? upper / 2 : 0.5 + lower / 2
}
