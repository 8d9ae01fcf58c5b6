import { midranks } from './midranks.ts'
import { normalCdf } from './normal-cdf.ts'

/**
 * Wilcoxon's signed-rank test for paired differences (Wilcoxon 1945, "Individual comparisons by
 * ranking methods", Biometrics Bulletin 1(6)): is the distribution of the differences symmetric
 * about 0 ('two-sided'), or shifted above ('greater') or below ('less')?
 *
 * Zeros are dropped first (Wilcoxon's own method; scipy.stats.wilcoxon's zero_method='wilcox').
 * The remaining n differences are ranked by absolute value with mid-ranks, and `statistic` is
 * W+ = the sum of the ranks of the positive differences, for every alternative (scipy reports
 * min(W+, W−) for 'two-sided'; W− = n(n + 1)/2 − W+).
 * - Exact (`exact: true`) when n <= 50 and no absolute values tie: the null distribution of W+
 *   (each rank positive or negative with probability 1/2) is counted by dynamic programming over
 *   the ranks, counts[s] = number of subsets of {1..n} summing to s. The counts stay below
 *   2^50 < 2^53, so every count and tail sum is an exact double and the p-value is exact.
 * - Otherwise the normal approximation: mean n(n + 1)/4, variance n(n + 1)(2n + 1)/24 −
 *   Σ(t³ − t)/48 over groups of t tied absolute values, with a continuity correction of 1/2
 *   toward the mean (as scipy's correction=True).
 * p-values: 'greater' P(W+ >= w), 'less' P(W+ <= w), 'two-sided' min(1, 2 · the smaller tail).
 *
 * Edges: NaN differences are a RangeError (drop missing pairs first); ±Infinity are ordinary
 * extremes; an unknown alternative is a RangeError. If every difference is 0 nothing is left to
 * rank: statistic 0, pValue 1, exact true (W+ = 0 is then the whole null distribution).
 * Cost: O(n³) for the exact counts with n <= 50 (about 60 000 additions), O(n log n) otherwise.
 */
export function wilcoxonSignedRank(
  differences: ArrayLike<number>,
  options: { alternative: 'greater' | 'less' | 'two-sided' },
): { statistic: number; pValue: number; exact: boolean } {
  const { alternative } = options
  if (alternative !== 'greater' && alternative !== 'less' && alternative !== 'two-sided') {
    throw new RangeError(`wilcoxonSignedRank needs alternative 'greater', 'less' or 'two-sided', got '${alternative}'`)
  }
  const nonzero: number[] = []
  for (let i = 0; i < differences.length; i++) {
    const d = differences[i]
    if (Number.isNaN(d)) throw new RangeError(`wilcoxonSignedRank cannot use NaN (difference ${i}); drop missing pairs first`)
    if (d !== 0) nonzero.push(d)
  }
  const n = nonzero.length
  if (n === 0) return { statistic: 0, pValue: 1, exact: true }
  const ranks = midranks(nonzero.map(Math.abs))
  let statistic = 0
  for (let i = 0; i < n; i++) if (nonzero[i] > 0) statistic += ranks[i]

  const sortedRanks = Float64Array.from(ranks).sort()
  let tieTerm = 0 // Σ (t³ − t) over groups of tied absolute values
  for (let start = 0; start < n; ) {
    let end = start
    while (end + 1 < n && sortedRanks[end + 1] === sortedRanks[start]) end++
    const t = end - start + 1
    tieTerm += t * t * t - t
    start = end + 1
  }

  if (n <= 50 && tieTerm === 0) {
    const total = (n * (n + 1)) / 2
    const counts = new Float64Array(total + 1)
    counts[0] = 1
    for (let rank = 1; rank <= n; rank++) {
      for (let sum = (rank * (rank + 1)) / 2; sum >= rank; sum--) counts[sum] += counts[sum - rank]
    }
    let atMost = 0
    for (let sum = 0; sum <= statistic; sum++) atMost += counts[sum]
    let atLeast = 0
    for (let sum = statistic; sum <= total; sum++) atLeast += counts[sum]
    const scale = 2 ** n
    return { statistic, pValue: combineTails(atMost / scale, atLeast / scale, alternative), exact: true }
  }

  const center = (n * (n + 1)) / 4
  const sd = Math.sqrt((n * (n + 1) * (2 * n + 1)) / 24 - tieTerm / 48)
  const lower = normalCdf((statistic - center + 0.5) / sd) // P(W+ <= w)
  const upper = normalCdf(-(statistic - center - 0.5) / sd) // P(W+ >= w)
  return { statistic, pValue: combineTails(lower, upper, alternative), exact: false }
}

function combineTails(lower: number, upper: number, alternative: 'greater' | 'less' | 'two-sided'): number {
  if (alternative === 'greater') return upper
  if (alternative === 'less') return lower
  return Math.min(1, 2 * Math.min(lower, upper))
}
