import type { SliceConfig } from '../config.ts'
import type { Dataset, Task } from '../data/dataset.ts'
import { sliceColumns, sliceRows } from '../data/slice-rows.ts'
import { UserError } from '../errors.ts'

/** One policy slice on one side's holdout: measured, or why not. */
export type PlannedSlice =
  | { readonly name: string; readonly status: 'measured'; readonly rows: Uint32Array }
  | { readonly name: string; readonly status: 'too-small' | 'one-class'; readonly rowCount: number }
  | { readonly name: string; readonly status: 'no-column' }

/**
 * Which holdout rows each policy slice selects on one side, and whether it is measured: slices with
 * fewer than `minRows` rows are too small to judge, a binary slice with one class only cannot be
 * scored (AUC, and importance, need both). The head side must have every column a slice names (a
 * UserError naming the slice, the key and the file); the base side may lack one that the pull
 * request adds, and then has no value for that slice.
 */
export function planSlices(slices: readonly SliceConfig[], holdout: Dataset, side: 'base' | 'head', options: { readonly task: Task; readonly minRows: number }): PlannedSlice[] {
  return slices.map((slice, index): PlannedSlice => {
    const rows = sliceRows(holdout, slice.where, { name: slice.name, index })
    if (!rows) {
      if (side === 'base') return { name: slice.name, status: 'no-column' }
      const known = new Set(holdout.features.map((f) => f.name))
      const missing = sliceColumns(slice.where).find((c) => !known.has(c))!
      throw new UserError(
        `The slice '${slice.name}' (slices[${index}].where) names the column '${missing}', which is not a feature of ${holdout.source} (features: ${holdout.features.map((f) => f.name).slice(0, 20).join(', ')}).`,
        'Correct the column name in the slice, or delete the slice.',
      )
    }
    if (rows.length < options.minRows) return { name: slice.name, status: 'too-small', rowCount: rows.length }
    if (options.task === 'binary') {
      const y = holdout.target!.values
      let positives = 0
      for (const i of rows) positives += y[i]
      if (positives === 0 || positives === rows.length) return { name: slice.name, status: 'one-class', rowCount: rows.length }
    }
    return { name: slice.name, status: 'measured', rows }
  })
}
