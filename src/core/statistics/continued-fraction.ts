import { InternalError } from '../errors.ts'

/**
 * Value of the continued fraction b0 + a1 / (b1 + a2 / (b2 + ...)) by the modified Lentz method
 * (Lentz 1976, Applied Optics 15(3); Thompson & Barnett 1986, J. Comput. Phys. 64; described in
 * Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd ed. 2007, §5.2).
 *
 * Forward evaluation: each step multiplies the running value by C_j * D_j, where
 * C_j = b_j + a_j / C_{j-1} and D_j = 1 / (b_j + a_j * D_{j-1}); a zero C or D is replaced by
 * 1e-300, so no step divides by zero. Stops when a step changes the value by less than a relative
 * 1e-15. Shared by the incomplete beta and gamma functions so both use one tested loop.
 *
 * `numerator(j)` is a_j and `denominator(j)` is b_j for j >= 1. A fraction that has not converged
 * after `maxTerms` steps is a bug in the caller's choice of branch: InternalError naming `caller`.
 * Cost: one division pair per term.
 */
export function continuedFraction(
  leading: number,
  numerator: (j: number) => number,
  denominator: (j: number) => number,
  limits: { maxTerms: number; caller: string },
): number {
  const tiny = 1e-300
  let value = leading === 0 ? tiny : leading
  let c = value
  let d = 0
  for (let j = 1; j <= limits.maxTerms; j++) {
    const a = numerator(j)
    const b = denominator(j)
    d = b + a * d
    if (Math.abs(d) < tiny) d = tiny
    c = b + a / c
    if (Math.abs(c) < tiny) c = tiny
    d = 1 / d
    const step = c * d
    value *= step
    if (Math.abs(step - 1) < 1e-15) return value
  }
  throw new InternalError(`${limits.caller}: continued fraction did not converge in ${limits.maxTerms} terms`)
}
