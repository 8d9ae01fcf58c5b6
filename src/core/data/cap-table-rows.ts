import { createRandom, shuffledIndices } from '../statistics/random.ts'
import { selectRows, type Dataset } from './dataset.ts'

/** What capTableRows did, for the report: nothing, or which sample it kept. */
export interface RowCapRecord {
  /** Rows in the table as read. */
  readonly rows: number
  /** Rows kept (= rows when the table was within the cap). */
  readonly kept: number
  /** The seed the sample was drawn with (derived from the policy seed by the caller). */
  readonly seed: number
  readonly sampled: boolean
}

/**
 * A policy maximum on a table's rows: above `max`, a simple random sample of `max` rows without
 * replacement (every row has inclusion probability max / rows; Cochran 1977, "Sampling Techniques",
 * 3rd ed., ch. 2), drawn with `seed`, kept in the table's own order, ids and target along. At or
 * below the cap the table is returned as it is. The same table, cap and seed give the same rows.
 * `missing` is counted again on the kept rows, except for a column with unseen categories (whose
 * NaN cells are not all missing), which keeps the whole table's count.
 * Cost: O(rows) for the shuffle, O(kept × columns) for the copy.
 */
export function capTableRows(table: Dataset, max: number, seed: number): { readonly table: Dataset; readonly record: RowCapRecord } {
  if (!Number.isInteger(max) || max < 1) throw new RangeError(`capTableRows needs max to be a whole number >= 1, got ${max}`)
  if (table.rows <= max) return { table, record: { rows: table.rows, kept: table.rows, seed, sampled: false } }
  const picked = shuffledIndices(table.rows, createRandom(seed)).subarray(0, max).sort()
  const kept = selectRows(table, picked)
  // Missing cells counted again on the kept rows (NaN cells; a table read against another's schema
  // keeps its whole-file unseenCategories counts, which are NaN too but reported apart).
  const missing = kept.columns.map((column, j) => {
    let count = 0
    for (let i = 0; i < column.length; i++) if (column[i] !== column[i]) count++
    return table.unseenCategories?.[table.features[j].name] ? table.missing[j] : count
  })
  return { table: { ...kept, missing }, record: { rows: table.rows, kept: max, seed, sampled: true } }
}
