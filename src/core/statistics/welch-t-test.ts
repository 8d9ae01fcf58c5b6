import { mean, sampleStandardDeviation } from 'simple-statistics'
import { studentTCdf } from './student-t-cdf.ts'

/** What a two-sided Welch test reports; `meanDifference` is first minus second. */
export interface WelchTTestResult {
  t: number
  df: number
  pValue: number
  meanDifference: number
  standardError: number
}

/** Summary statistics of one group: mean, sample standard deviation (ddof 1) and size. */
export interface GroupSummary {
  mean: number
  sd: number
  n: number
}

/**
 * Welch's two-sample t test (unequal variances), two-sided, from the raw samples: the means and
 * sample standard deviations (ddof 1) come from simple-statistics, the rest is
 * welchTTestFromSummary. simple-statistics' own tTestTwoSample pools the variances (Student's
 * test) and returns only the statistic.
 *
 * Edges: fewer than two values on a side, or a NaN value (drop missing values first), is a
 * RangeError; the degenerate zero-variance cases are as in welchTTestFromSummary.
 * Cost: O(n + m) plus one t CDF.
 */
export function welchTTest(x: ArrayLike<number>, y: ArrayLike<number>): WelchTTestResult {
  if (x.length < 2 || y.length < 2) {
    throw new RangeError(`welchTTest needs at least two values per sample, got ${x.length} and ${y.length}`)
  }
  const first = Array.from(x)
  const second = Array.from(y)
  const missing = first.findIndex(Number.isNaN)
  const missingSecond = second.findIndex(Number.isNaN)
  if (missing >= 0 || missingSecond >= 0) {
    const [where, index] = missing >= 0 ? ['x', missing] : ['y', missingSecond]
    throw new RangeError(`welchTTest cannot use NaN (${where}[${index}]); drop missing values first`)
  }
  return welchTTestFromSummary(
    { mean: mean(first), sd: sampleStandardDeviation(first), n: first.length },
    { mean: mean(second), sd: sampleStandardDeviation(second), n: second.length },
  )
}

/**
 * Welch's two-sample t test from summary statistics (Welch 1947, Biometrika 34; the
 * Welch–Satterthwaite degrees of freedom, Satterthwaite 1946): with v = sd² / n per group,
 * standardError = sqrt(v1 + v2), t = (mean1 − mean2) / standardError,
 * df = (v1 + v2)² / (v1² / (n1 − 1) + v2² / (n2 − 1)), generally not a whole number, and
 * pValue = 2 · P(T_df <= −|t|) from studentTCdf. Matches scipy.stats.ttest_ind(equal_var=False)
 * and ttest_ind_from_stats(equal_var=False).
 *
 * Edges: n must be a whole number >= 2 and sd finite and >= 0 on each side, means finite
 * (RangeError otherwise). If both standard deviations are 0 the test degenerates: df is NaN
 * (0/0), and equal means give t = 0, pValue = 1, unequal means t = ±Infinity, pValue = 0 (no
 * within-group noise at all, so any difference is exact). Cost: O(1) plus one t CDF.
 */
export function welchTTestFromSummary(a: GroupSummary, b: GroupSummary): WelchTTestResult {
  checkSummary(a, 'first')
  checkSummary(b, 'second')
  const va = (a.sd * a.sd) / a.n
  const vb = (b.sd * b.sd) / b.n
  const standardError = Math.sqrt(va + vb)
  const meanDifference = a.mean - b.mean
  if (standardError === 0) {
    const t = meanDifference === 0 ? 0 : Math.sign(meanDifference) * Infinity
    return { t, df: NaN, pValue: meanDifference === 0 ? 1 : 0, meanDifference, standardError }
  }
  const t = meanDifference / standardError
  const df = (va + vb) ** 2 / ((va * va) / (a.n - 1) + (vb * vb) / (b.n - 1))
  const pValue = Math.min(1, 2 * studentTCdf(-Math.abs(t), df))
  return { t, df, pValue, meanDifference, standardError }
}

function checkSummary(group: GroupSummary, which: 'first' | 'second'): void {
  if (!(Number.isInteger(group.n) && group.n >= 2)) {
    throw new RangeError(`welchTTestFromSummary needs n >= 2 (a whole number) in the ${which} group, got ${group.n}`)
  }
  if (!(group.sd >= 0 && group.sd < Infinity)) {
    throw new RangeError(`welchTTestFromSummary needs a finite sd >= 0 in the ${which} group, got ${group.sd}`)
  }
  if (!Number.isFinite(group.mean)) {
    throw new RangeError(`welchTTestFromSummary needs a finite mean in the ${which} group, got ${group.mean}`)
  }
}
