import { capTableRows } from './cap-table-rows.ts'
import { selectRows, type Dataset } from './dataset.ts'

/**
 * The head's holdout in the base's row order, so that a pull request that only reorders the holdout
 * file compares row by row:
 * - with ids on both sides that hold the same ids (each once) in another order, by id;
 * - otherwise, with the same number of rows, by content: when the head's rows are the base's rows as
 *   a multiset (the same target and the same values in every column the two sides share, compared
 *   as text for categories), each base row takes a head row with the same content. Rows that are
 *   exact duplicates are interchangeable, so which one is taken does not matter.
 * Anything else is returned as it is, for the holdout-rows check to judge. Cost O(rows · shared columns).
 */
export function alignHoldout(base: Dataset, head: Dataset): Dataset {
  if (base.rows !== head.rows) return head
  const order = base.ids && head.ids ? orderById(base, head) : orderByContent(base, head)
  if (!order || order.every((i, k) => i === k)) return head
  return selectRows(head, order)
}

function orderById(base: Dataset, head: Dataset): number[] | null {
  const position = new Map<string, number>()
  head.ids!.values.forEach((id, i) => position.set(id, i))
  if (position.size !== head.rows || new Set(base.ids!.values).size !== base.rows) return null
  const order: number[] = []
  for (const id of base.ids!.values) {
    const i = position.get(id)
    if (i === undefined) return null
    order.push(i)
  }
  return order
}

function orderByContent(base: Dataset, head: Dataset): number[] | null {
  if (!base.target || !head.target) return null
  const headIndex = new Map(head.features.map((f, j) => [f.name, j]))
  const shared = base.features.flatMap((f, j) => {
    const hj = headIndex.get(f.name)
    return hj === undefined ? [] : [{ b: j, h: hj }]
  })
  const cell = (data: Dataset, j: number, i: number) => {
    const v = data.columns[j][i]
    const categories = data.features[j].categories
    return Number.isNaN(v) ? 'NaN' : data.features[j].kind === 'categorical' && categories ? `c:${categories[v] ?? v}` : String(v)
  }
  const key = (data: Dataset, side: 'b' | 'h', i: number) =>
    [String(data.target!.values[i]), ...shared.map((s) => cell(data, s[side], i))].join('\u0000')
  const waiting = new Map<string, number[]>()
  for (let i = head.rows - 1; i >= 0; i--) {
    const k = key(head, 'h', i)
    const list = waiting.get(k)
    if (list) list.push(i)
    else waiting.set(k, [i])
  }
  const order: number[] = []
  for (let i = 0; i < base.rows; i++) {
    const next = waiting.get(key(base, 'b', i))?.pop()
    if (next === undefined) return null
    order.push(next)
  }
  return order
}

/**
 * Both sides' holdouts under a row cap (`data.max_holdout_rows`), the head's already in the base's
 * order (alignHoldout). The sample is decided once, by row index, from the base's row count and the
 * one seed, and the same indices are taken on both sides: after alignment row i of the head is row i
 * of the base whenever the two hold the same rows, so the capped holdouts stay paired row by row (the
 * paired score comparison and the paired bootstrap need that). Sampling each side on its own, or by a
 * hash of the content, would break the pairing as soon as the head changed a column's values.
 * Holdouts of different lengths cannot be paired; each is then sampled with the same seed, and the
 * holdout-rows check, which judges the whole holdouts, reports the difference.
 */
export function capAlignedHoldouts(base: Dataset, alignedHead: Dataset, max: number, seed: number) {
  return { base: capTableRows(base, max, seed), head: capTableRows(alignedHead, max, seed) }
}
