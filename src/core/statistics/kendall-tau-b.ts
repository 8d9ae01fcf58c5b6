/**
 * Kendall's tau-b rank correlation of two paired samples, in [-1, 1].
 *
 * Tau-b divides (concordant − discordant) by sqrt((n0 − tiesX) · (n0 − tiesY)), where n0 is the
 * number of pairs and tiesX, tiesY count pairs tied in x (in y), including pairs tied in both; so
 * ties shrink the denominator instead of counting as disagreement (Kendall 1945, Biometrika 33(3),
 * "The treatment of ties in ranking problems"). Same variant as scipy.stats.kendalltau's default.
 * simple-statistics has no Kendall correlation. Values are compared with < and >, so ±Infinity
 * are ordinary extremes.
 *
 * Edges: samples of different length are a RangeError. Returns NaN for fewer than two pairs, for
 * a constant sample (the correlation is undefined) and when any value is NaN (as scipy's default
 * nan_policy='propagate'). Cost: O(n²) comparisons, fine for the hundreds of features it ranks.
 */
export function kendallTauB(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) {
    throw new RangeError(`kendallTauB needs paired samples, got ${x.length} and ${y.length} values`)
  }
  const n = x.length
  if (n < 2 || hasNaN(x) || hasNaN(y)) return NaN
  let concordant = 0
  let discordant = 0
  let tiedInX = 0
  let tiedInY = 0
  for (let i = 0; i < n - 1; i++) {
    for (let j = i + 1; j < n; j++) {
      const dx = compare(x[i], x[j])
      const dy = compare(y[i], y[j])
      if (dx === 0) tiedInX++
      if (dy === 0) tiedInY++
      if (dx !== 0 && dy !== 0) {
        if (dx === dy) concordant++
        else discordant++
      }
    }
  }
  const pairs = (n * (n - 1)) / 2
  const denominator = Math.sqrt((pairs - tiedInX) * (pairs - tiedInY))
  return denominator === 0 ? NaN : (concordant - discordant) / denominator
}

function compare(a: number, b: number): number {
  return a < b ? -1 : a > b ? 1 : 0
}

function hasNaN(values: ArrayLike<number>): boolean {
  for (let i = 0; i < values.length; i++) if (Number.isNaN(values[i])) return true
  return false
}
