import { checkPaired } from './check-paired.ts'

/**
 * Area under the ROC curve, as the Mann-Whitney U statistic over n1 * n0:
 * AUC = (#{positive score > negative score} + 0.5 * #{equal}) / (n1 * n0) (Hanley & McNeil 1982,
 * Radiology 143(1)). This equals the rank-sum form (R1 - n1(n1+1)/2) / (n1 n0) with midranks for
 * ties, and scikit-learn's roc_auc_score for binary targets.
 *
 * Cost O(n log n): the scores of each class are copied and sorted with the native numeric typed-array
 * sort, then one merge counts the pairs, so permutation importance can call it thousands of times.
 * Returns NaN when a class is absent, for no rows, or when a score is NaN.
 */
export function rocAuc(y: ArrayLike<number>, score: ArrayLike<number>): number {
  checkPaired('rocAuc', y, score, 'binary')
  const n = y.length
  let positives = 0
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(score[i])) return NaN
    positives += y[i]
  }
  const negatives = n - positives
  if (positives === 0 || negatives === 0) return NaN
  const pos = new Float64Array(positives)
  const neg = new Float64Array(negatives)
  for (let i = 0, p = 0, q = 0; i < n; i++) {
    if (y[i] === 1) pos[p++] = score[i]
    else neg[q++] = score[i]
  }
  pos.sort()
  neg.sort()
  // For each run of equal positive scores: negatives strictly below count 1, equal ones count 1/2.
  let pairs = 0
  let below = 0
  for (let i = 0; i < positives; ) {
    const value = pos[i]
    let runEnd = i + 1
    while (runEnd < positives && pos[runEnd] === value) runEnd++
    while (below < negatives && neg[below] < value) below++
    let tied = below
    while (tied < negatives && neg[tied] === value) tied++
    pairs += (runEnd - i) * (below + (tied - below) / 2)
    i = runEnd
  }
  return pairs / (positives * negatives)
}
