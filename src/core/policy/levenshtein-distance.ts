/**
 * Levenshtein distance: the fewest single-character insertions, deletions and substitutions that
 * turn `a` into `b` (Levenshtein 1966, "Binary codes capable of correcting deletions, insertions,
 * and reversals", Soviet Physics Doklady 10(8)), computed with the Wagner–Fischer dynamic programme
 * (Wagner & Fischer 1974, "The string-to-string correction problem", JACM 21(1)), keeping one row.
 *
 * Compares UTF-16 code units, which is exact for the ASCII keys and column names it is used on.
 * Either string empty: the other's length. Cost O(|a|·|b|) time, O(|b|) memory.
 */
export function levenshteinDistance(a: string, b: string): number {
  if (a === b) return 0
  if (a.length === 0) return b.length
  if (b.length === 0) return a.length
  // row[j] = distance between the first i characters of a and the first j characters of b.
  const row = Array.from({ length: b.length + 1 }, (_, j) => j)
  for (let i = 1; i <= a.length; i++) {
    let diagonal = row[0] // distance(a[0..i-1), b[0..j-1)) before it is overwritten
    row[0] = i
    for (let j = 1; j <= b.length; j++) {
      const above = row[j]
      const substitution = diagonal + (a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1)
      row[j] = Math.min(above + 1, row[j - 1] + 1, substitution)
      diagonal = above
    }
  }
  return row[b.length]
}
