/**
 * Items ranked by a value, highest first, ties broken by name (JavaScript string order, code unit by
 * code unit): the one order the gate ranks features, groups, gains and slice leaders in, so that the
 * report's ranks, the rank-shift check and the drop-column candidates agree.
 *
 * Returns a new array; `items` is left as it was. A NaN value compares as a tie and falls back to
 * the name. Array.prototype.sort is stable, so items with equal values and equal names keep their
 * input order. Cost O(n log n).
 */
export function rankByValue<T extends { readonly name: string }>(items: readonly T[], value: (item: T) => number): T[] {
  return [...items].sort((a, b) => value(b) - value(a) || (a.name < b.name ? -1 : 1))
}
