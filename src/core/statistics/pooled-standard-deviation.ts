/**
 * Pooled standard deviation of two groups of equal size from their sample SDs:
 * sqrt((sA² + sB²) / 2), the root mean square of the two SDs (Cohen 1988, "Statistical Power Analysis
 * for the Behavioral Sciences", 2nd ed., §2.3, the equal-n case of the pooled within-group SD). The
 * gate uses it to express a change between the baseline and the candidate in reseed SDs, where both
 * sides ran the same number of refits.
 *
 * Edges: a NaN SD (one refit) gives NaN; two zeros give 0. Cost O(1).
 */
export function pooledStandardDeviation(sdA: number, sdB: number): number {
  return Math.sqrt((sdA ** 2 + sdB ** 2) / 2)
}
