import { selectRows, type Dataset } from './dataset.ts'

/**
 * The head's holdout in the base's row order when both have ids and hold the same ids (each once) in
 * another order, so that a pull request that only reorders the holdout file compares row by row.
 * Anything else is returned as it is, for the holdout-rows check to judge.
 */
export function alignHoldout(base: Dataset, head: Dataset): Dataset {
  if (!base.ids || !head.ids || base.rows !== head.rows) return head
  const position = new Map<string, number>()
  head.ids.values.forEach((id, i) => position.set(id, i))
  if (position.size !== head.rows || new Set(base.ids.values).size !== base.rows) return head
  const order: number[] = []
  for (const id of base.ids.values) {
    const i = position.get(id)
    if (i === undefined) return head
    order.push(i)
  }
  if (order.every((i, k) => i === k)) return head
  return selectRows(head, order)
}
