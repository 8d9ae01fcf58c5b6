/**
 * One pass over a column: how many cells are present (not NaN), how many distinct values they hold,
 * and whether every present value is a whole number. The starter policy's column summary and the
 * gain check's identifier test both read it.
 */
export interface ColumnProfile {
  readonly present: number
  readonly distinct: number
  readonly wholeNumbers: boolean
}

export function profileColumn(values: ArrayLike<number>): ColumnProfile {
  const seen = new Set<number>()
  let present = 0
  let wholeNumbers = true
  for (let i = 0; i < values.length; i++) {
    const v = values[i]
    if (Number.isNaN(v)) continue
    present++
    seen.add(v)
    if (wholeNumbers && !Number.isInteger(v)) wholeNumbers = false
  }
  return { present, distinct: seen.size, wholeNumbers }
}
