/**
 * The predictions of some rows, in the order given: `predictions` holds `width` values per row
 * (1, or a multiclass model's K class probabilities, row-major), and so does the result. O(rows·width).
 */
export function predictionRows(predictions: ArrayLike<number>, rows: ArrayLike<number>, width: number): Float64Array {
  const out = new Float64Array(rows.length * width)
  for (let r = 0; r < rows.length; r++) {
    const from = rows[r] * width
    for (let c = 0; c < width; c++) out[r * width + c] = predictions[from + c]
  }
  return out
}
