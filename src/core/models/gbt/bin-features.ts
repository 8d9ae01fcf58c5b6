import type { FeatureInfo, FeatureMatrix } from '../../data/dataset.ts'
import { sortFloat64 } from './sort-float64.ts'

/** The bin code of a missing value (NaN) in every column. Value bins are 0..binCount-1, at most 254. */
export const MISSING_BIN = 255

/**
 * A feature matrix reduced to small integer bin codes, computed once per dataset and shared by every
 * refit (ordinary, reseeded and drop-column refits only choose rows and columns of it).
 */
export interface BinnedFeatures {
  readonly rows: number
  readonly features: readonly FeatureInfo[]
  /**
   * codes[j][i]: the bin of row i in column j, 0..binCounts[j]-1, or MISSING_BIN for NaN. Every
   * column is a view of one feature-major block (`matrix`), so the whole binned table is one buffer
   * that worker threads can share.
   */
  readonly codes: readonly Uint8Array[]
  /** The block behind `codes`: column j is matrix[j * rows, (j + 1) * rows). */
  readonly matrix: Uint8Array
  /** Number of value bins per column (0 when the column is all missing). */
  readonly binCounts: Int32Array
  /**
   * upperEdges[j][b]: every training value in bins 0..b is <= upperEdges[j][b] and every value in
   * bins above b is greater, so the split "bin <= b" is the raw split "value <= upperEdges[j][b]".
   */
  readonly upperEdges: readonly Float64Array[]
}

export interface BinFeaturesOptions {
  /** At most this many value bins per column, 2..255 (default 255). */
  readonly maxBins?: number
  /** Put the codes in a SharedArrayBuffer, so worker threads can read them without a copy. */
  readonly shared?: boolean
}

/**
 * Quantile binning of every column of a feature matrix, for histogram tree learning (the "hist"
 * approximation of Chen & Guestrin 2016, XGBoost, section 3.2; Ke et al. 2017, LightGBM).
 *
 * Per column: the distinct non-missing values are sorted with their counts. With at most `maxBins`
 * distinct values each gets its own bin. Otherwise bins are closed greedily in value order as soon as
 * a bin holds at least (rows not yet binned) / (bins not yet used) rows, so bins hold about equal
 * numbers of rows, a value shared by many rows gets a bin alone, and no more than `maxBins` are used.
 * A bin's upper edge is the midpoint between its largest value and the next bin's smallest value
 * (or that largest value when the midpoint rounds up to the next value); the last bin's edge is the
 * largest observed value. Edges keep raw thresholds exact on the training rows and put unseen
 * values between two training values on the nearer side.
 * Categorical columns hold integer codes and are binned like numbers (split as ordered codes).
 * Edges: an all-missing column has no value bins; a constant column has one (it can never split).
 * Cost: O(n log n) per column for the sort, O(n log bins) for the codes.
 */
export function binFeatures(matrix: FeatureMatrix, options: BinFeaturesOptions = {}): BinnedFeatures {
  const maxBins = options.maxBins ?? 255
  if (!Number.isInteger(maxBins) || maxBins < 2 || maxBins > 255) {
    throw new RangeError(`binFeatures needs maxBins to be a whole number from 2 to 255, got ${maxBins}`)
  }
  if (matrix.columns.length !== matrix.features.length) {
    throw new RangeError(
      `binFeatures needs one column per feature, got ${matrix.columns.length} columns for ${matrix.features.length} features`,
    )
  }
  const n = matrix.rows
  const width = matrix.columns.length
  const block = new Uint8Array(options.shared ? new SharedArrayBuffer(n * width) : new ArrayBuffer(n * width))
  const codes: Uint8Array[] = []
  const upperEdges: Float64Array[] = []
  const binCounts = new Int32Array(matrix.columns.length)
  for (let j = 0; j < matrix.columns.length; j++) {
    const column = matrix.columns[j]
    if (column.length !== n) {
      throw new RangeError(`binFeatures: column '${matrix.features[j].name}' has ${column.length} values, expected ${n}`)
    }
    const edges = quantileEdges(column, maxBins)
    upperEdges.push(edges)
    binCounts[j] = edges.length
    const out = block.subarray(j * n, (j + 1) * n)
    assignBins(column, edges, out)
    codes.push(out)
  }
  return { rows: n, features: matrix.features, codes, matrix: block, binCounts, upperEdges }
}

function quantileEdges(column: Float64Array, maxBins: number): Float64Array {
  let present = 0
  for (let i = 0; i < column.length; i++) if (column[i] === column[i]) present++
  const sorted = new Float64Array(present)
  let k = 0
  for (let i = 0; i < column.length; i++) if (column[i] === column[i]) sorted[k++] = column[i]
  sortFloat64(sorted)
  // Distinct values and their counts, in place at the front of two arrays.
  const values = new Float64Array(present)
  const counts = new Int32Array(present)
  let distinct = 0
  for (let i = 0; i < present; i++) {
    if (distinct > 0 && sorted[i] === values[distinct - 1]) counts[distinct - 1]++
    else {
      values[distinct] = sorted[i]
      counts[distinct] = 1
      distinct++
    }
  }
  const edges: number[] = []
  let rowsLeft = present
  let binsLeft = maxBins
  let inBin = 0
  for (let d = 0; d < distinct; d++) {
    inBin += counts[d]
    const isLast = d === distinct - 1
    const closes = isLast || distinct <= maxBins || inBin * binsLeft >= rowsLeft
    if (!closes) continue
    edges.push(isLast ? values[d] : edgeBetween(values[d], values[d + 1]))
    rowsLeft -= inBin
    binsLeft--
    inBin = 0
  }
  return Float64Array.from(edges)
}

function edgeBetween(below: number, above: number): number {
  const mid = below + (above - below) / 2
  return mid < above ? mid : below
}

/**
 * Smallest b with value <= edges[b], for every value; NaN gets MISSING_BIN. The search runs over the
 * edges padded to 256 with +Infinity, in eight fixed halvings, each adding its step when the edge
 * below it is smaller than the value: the count of edges below the value, which is the smallest b
 * above because the edges ascend. A fixed number of steps with no early exit keeps the processor from
 * mispredicting a branch at every step of a search on random-looking values.
 */
function assignBins(column: Float64Array, edges: Float64Array, out: Uint8Array): void {
  const padded = new Float64Array(256).fill(Infinity)
  padded.set(edges)
  const last = Math.max(0, edges.length - 1)
  for (let i = 0; i < column.length; i++) {
    const v = column[i]
    if (v !== v) {
      out[i] = MISSING_BIN
      continue
    }
    let b = padded[127] < v ? 128 : 0
    b += padded[b + 63] < v ? 64 : 0
    b += padded[b + 31] < v ? 32 : 0
    b += padded[b + 15] < v ? 16 : 0
    b += padded[b + 7] < v ? 8 : 0
    b += padded[b + 3] < v ? 4 : 0
    b += padded[b + 1] < v ? 2 : 0
    b += padded[b] < v ? 1 : 0
    out[i] = b < last ? b : last
  }
}
