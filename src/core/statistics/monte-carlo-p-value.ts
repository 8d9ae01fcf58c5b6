/**
 * Monte Carlo p-value with the +1 correction, (extreme + 1) / (draws + 1), where `extreme` counts
 * the random draws (permutations, resamples) at least as extreme as the observed statistic.
 * Counting the observed data as one of the draws makes the test exact at its level and keeps the
 * p-value above zero (Phipson & Smyth 2010, "Permutation p-values should never be zero",
 * Statistical Applications in Genetics and Molecular Biology 9(1)).
 *
 * Edges: both counts must be whole numbers with 0 <= extreme <= draws (RangeError otherwise);
 * draws = 0 gives 1 (no evidence). Cost: O(1).
 */
export function monteCarloPValue(extreme: number, draws: number): number {
  if (!(Number.isInteger(draws) && draws >= 0)) {
    throw new RangeError(`monteCarloPValue needs a whole number of draws >= 0, got ${draws}`)
  }
  if (!(Number.isInteger(extreme) && extreme >= 0 && extreme <= draws)) {
    throw new RangeError(`monteCarloPValue needs a whole number of extreme draws from 0 to ${draws}, got ${extreme}`)
  }
  return (extreme + 1) / (draws + 1)
}
