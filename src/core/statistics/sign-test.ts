import { regularizedIncompleteBeta } from './regularized-incomplete-beta.ts'

/**
 * The sign test for paired differences: under the null hypothesis each nonzero difference is
 * positive with probability 1/2, so `positive` ~ Binomial(n, 1/2) with n = positive + negative
 * (zeros are dropped, the usual convention; Conover 1999, Practical Nonparametric Statistics,
 * 3rd ed., "The sign test", §3.4, section number from memory). The p-value is the exact binomial tail: 'greater' P(X >= positive), 'less'
 * P(X <= positive) = P(X >= negative), 'two-sided' min(1, 2 · the smaller tail) (for p = 1/2
 * the same as scipy.stats.binomtest). Tails use P(X >= k) = I_{1/2}(k, n − k + 1), the
 * binomial–beta identity (Abramowitz & Stegun 1964, 26.5.24, equation number from memory), so large n costs no more than
 * small n and stays accurate to about 1e-14 relative.
 *
 * Edges: NaN differences are a RangeError (drop missing pairs first); if every difference is 0,
 * n = 0 and pValue is 1. An unknown alternative is a RangeError. Cost: O(n) to count plus one
 * incomplete beta, O(sqrt(n)) terms.
 */
export function signTest(
  differences: ArrayLike<number>,
  options: { alternative: 'greater' | 'less' | 'two-sided' },
): { positive: number; negative: number; pValue: number } {
  let positive = 0
  let negative = 0
  for (let i = 0; i < differences.length; i++) {
    const d = differences[i]
    if (Number.isNaN(d)) throw new RangeError(`signTest cannot use NaN (difference ${i}); drop missing pairs first`)
    if (d > 0) positive++
    else if (d < 0) negative++
  }
  const n = positive + negative
  const atLeast = (k: number): number => (k === 0 ? 1 : regularizedIncompleteBeta(0.5, k, n - k + 1))
  const { alternative } = options
  let pValue: number
  if (alternative === 'greater') pValue = atLeast(positive)
  else if (alternative === 'less') pValue = atLeast(negative)
  else if (alternative === 'two-sided') pValue = Math.min(1, 2 * Math.min(atLeast(positive), atLeast(negative)))
  else throw new RangeError(`signTest needs alternative 'greater', 'less' or 'two-sided', got '${alternative}'`)
  return { positive, negative, pValue }
}
