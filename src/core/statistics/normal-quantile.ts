import { InternalError } from '../errors.ts'
import { regularizedIncompleteGamma } from './regularized-incomplete-gamma.ts'

/**
 * Standard normal quantile (inverse CDF, probit): the z with Φ(z) = p.
 *
 * Method: Newton's iteration on an accurate Φ, in the form where it converges monotonically.
 * With q = min(p, 1 − p):
 * - tails (q < 1/4): solve ln Φ(−x) = ln q for x > 0. ln Φ is concave, and the start
 *   x0 = sqrt(−2 ln q) lies beyond the root (the Chernoff bound Φ(−x) <= e^{−x²/2}), so every
 *   step moves toward the root without overshooting;
 * - centre (q >= 1/4): solve erf(x/√2) = |2p − 1| from x0 = 0 (erf is concave on x >= 0, same
 *   argument), so p close to 1/2 keeps its relative precision.
 * simple-statistics' probit uses a closed-form approximation of the inverse error function with
 * error near 1e-3 (1.95716 at p = 0.975, where the quantile is 1.959964); we need a few more digits.
 *
 * Edges: p = 0 and p = 1 give −Infinity and Infinity; p outside [0, 1] or NaN is a RangeError.
 * Below p ≈ 1e-300 Φ reaches subnormal numbers and the result keeps fewer digits.
 * Cost: 3 to 8 incomplete gamma evaluations.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`normalQuantile needs p in [0, 1], got ${p}`)
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  if (p === 0.5) return 0
  const q = Math.min(p, 1 - p)
  const density = (x: number): number => Math.exp((-x * x) / 2) / Math.sqrt(2 * Math.PI)
  let x: number
  let step: (x: number) => number
  if (q < 0.25) {
    const logQ = Math.log(q)
    x = Math.sqrt(-2 * logQ)
    step = (x) => {
      const tail = regularizedIncompleteGamma(0.5, (x * x) / 2).upper / 2
      return ((Math.log(tail) - logQ) * tail) / density(x)
    }
  } else {
    const central = Math.abs(2 * p - 1)
    x = 0
    step = (x) => -(regularizedIncompleteGamma(0.5, (x * x) / 2).lower - central) / (2 * density(x))
  }
  for (let iteration = 0; iteration < 100; iteration++) {
    const delta = step(x)
    x += delta
    if (Math.abs(delta) <= 4e-15 * x) return p < 0.5 ? -x : x
  }
  throw new InternalError(`normalQuantile: Newton iteration did not converge for p = ${p}`)
}
