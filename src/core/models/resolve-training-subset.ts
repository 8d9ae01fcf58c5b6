import type { Task } from '../data/dataset.ts'

/** The training rows and columns of one fit, checked, with the target gathered in row order. */
export interface TrainingSubset {
  /** Row indices in the order to use. */
  readonly positions: Int32Array
  /** Allowed column indices, deduplicated, in matrix order. */
  readonly features: readonly number[]
  /** target[positions[p]] at p. */
  readonly y: Float64Array
}

/**
 * Checks and resolves the `rows` and `features` options every built-in learner takes (default: all
 * rows in order, all columns), and gathers the target at those rows. `caller` starts every
 * RangeError. Binary targets must be 0 or 1, multiclass targets class indices (whole numbers >= 0),
 * regression targets finite. O(rows + features).
 */
export function resolveTrainingSubset(
  caller: string,
  shape: { readonly rows: number; readonly features: number },
  target: Float64Array,
  task: Task,
  options: { readonly rows?: ArrayLike<number>; readonly features?: readonly number[] },
): TrainingSubset {
  if (task !== 'regression' && task !== 'binary' && task !== 'multiclass') throw new RangeError(`${caller}: unknown task '${String(task)}'`)
  if (target.length !== shape.rows) {
    throw new RangeError(`${caller} needs one target per row, got ${target.length} targets for ${shape.rows} rows`)
  }
  const { rows, features } = options
  let positions: Int32Array
  if (rows === undefined) positions = Int32Array.from({ length: shape.rows }, (_, i) => i)
  else {
    positions = new Int32Array(rows.length)
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]
      if (!Number.isInteger(r) || r < 0 || r >= shape.rows) {
        throw new RangeError(`${caller}: rows[${i}] is ${r}, not a row index from 0 to ${shape.rows - 1}`)
      }
      positions[i] = r
    }
  }
  if (positions.length === 0) throw new RangeError(`${caller} needs at least one training row, got none`)
  for (const j of features ?? []) {
    if (!Number.isInteger(j) || j < 0 || j >= shape.features) {
      throw new RangeError(`${caller}: features contains ${j}, not a column index from 0 to ${shape.features - 1}`)
    }
  }
  const used = features === undefined ? Array.from({ length: shape.features }, (_, j) => j) : [...new Set(features)].sort((a, b) => a - b)
  const y = new Float64Array(positions.length)
  for (let p = 0; p < positions.length; p++) {
    const value = target[positions[p]]
    if (!Number.isFinite(value) || (task === 'binary' && value !== 0 && value !== 1) || (task === 'multiclass' && !(Number.isInteger(value) && value >= 0))) {
      const rule =
        task === 'binary' ? 'binary targets must be 0 or 1' : task === 'multiclass' ? 'multiclass targets must be class indices 0, 1, 2, ...' : 'regression targets must be finite'
      throw new RangeError(`${caller}: target of row ${positions[p]} is ${value}; ${rule}`)
    }
    y[p] = value
  }
  return { positions, features: used, y }
}
