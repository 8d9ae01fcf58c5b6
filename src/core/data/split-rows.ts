import { UserError } from '../errors.ts'
import { createRandom, shuffledIndices } from '../statistics/random.ts'
import { selectRows, type Dataset } from './dataset.ts'
import { fnv1a32 } from './fnv1a32.ts'

export interface SplitRowsOptions {
  /** Share of rows (or, with `by`, expected share of ids) that go to the holdout, in (0, 1). */
  readonly fraction: number
  readonly seed: number
  /** Split by this id column: all rows of an id land on the same side, whatever the row order. */
  readonly by?: string
}

/**
 * Splits a dataset into a training part and a holdout.
 *
 * With `by` (which must be the dataset's id column) a row goes to the holdout when
 * fmix32(FNV-1a 32-bit of the seed's four little-endian bytes followed by the id's UTF-8 bytes)
 * is below fraction * 2^32. The side depends only on the id text and the seed, so the baseline and
 * candidate of a pull request split the same ids the same way even when their files order or filter
 * rows differently, and repeated ids stay together. The holdout share is then fraction only in
 * expectation. fmix32 is MurmurHash3's finalizer (Appleby, MurmurHash3 reference code); without it,
 * sequential ids such as "1".."10" share their high bits and mostly land on one side.
 *
 * Without `by`, a Fisher-Yates shuffle seeded by `createRandom(seed)` takes Math.round(fraction * rows)
 * rows for the holdout. Both sides keep the file's row order. `missing` is recounted per side as NaN
 * cells (unseen categories of a file read with a schema then count as missing; `unseenCategories`
 * is dropped). O(rows * features).
 *
 * RangeError for a fraction outside (0, 1) or a non-finite seed; UserError when `by` is not the id
 * column or when a side would be empty.
 */
export function splitRows(dataset: Dataset, options: SplitRowsOptions): { train: Dataset; holdout: Dataset } {
  const { fraction, seed, by } = options
  if (!(fraction > 0 && fraction < 1)) throw new RangeError(`splitRows needs a fraction between 0 and 1 (exclusive), got ${fraction}`)
  if (!Number.isFinite(seed)) throw new RangeError(`splitRows needs a finite seed, got ${seed}`)
  const isHoldout = new Uint8Array(dataset.rows)
  if (by === undefined) {
    const order = shuffledIndices(dataset.rows, createRandom(seed))
    const holdoutRows = Math.round(fraction * dataset.rows)
    for (let k = 0; k < holdoutRows; k++) isHoldout[order[k]] = 1
  } else {
    if (dataset.ids?.name !== by) {
      throw new UserError(
        `Cannot split ${dataset.source} by '${by}': ${dataset.ids ? `the id column is '${dataset.ids.name}'` : 'it has no id column'}.`,
        `Give the column '${by}' the role 'id', or split without naming a column.`,
      )
    }
    const threshold = fraction * 4294967296
    const encoder = new TextEncoder()
    const s = seed >>> 0
    const seedBytes = Uint8Array.of(s & 0xff, (s >>> 8) & 0xff, (s >>> 16) & 0xff, s >>> 24)
    const seedState = fnv1a32(seedBytes)
    dataset.ids.values.forEach((id, i) => {
      isHoldout[i] = fmix32(fnv1a32(encoder.encode(id), seedState)) < threshold ? 1 : 0
    })
  }
  const holdoutIndices: number[] = []
  const trainIndices: number[] = []
  for (let i = 0; i < dataset.rows; i++) (isHoldout[i] ? holdoutIndices : trainIndices).push(i)
  for (const [side, indices] of [['training part', trainIndices], ['holdout', holdoutIndices]] as const) {
    if (indices.length === 0) {
      const count = by === undefined ? dataset.rows : new Set(dataset.ids!.values).size
      const what = `its ${count} ${by === undefined ? 'row' : 'distinct id'}${count === 1 ? '' : 's'}`
      throw new UserError(
        `Splitting ${dataset.source} with a holdout fraction of ${fraction} leaves the ${side} empty (${what}).`,
        'Use a fraction further from 0 and 1, or more data.',
      )
    }
  }
  return { train: side(dataset, trainIndices), holdout: side(dataset, holdoutIndices) }
}

/** MurmurHash3's 32-bit finalizer: every input bit affects every output bit. */
function fmix32(h: number): number {
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b)
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35)
  h ^= h >>> 16
  return h >>> 0
}

function side(dataset: Dataset, indices: number[]): Dataset {
  const { unseenCategories: _dropped, ...rest } = selectRows<Dataset>(dataset, indices)
  return {
    ...rest,
    missing: rest.columns.map((column) => column.reduce((n, v) => (Number.isNaN(v) ? n + 1 : n), 0)),
  }
}
