import type { Dataset } from '../../core/data/dataset.ts'

/** Per column: kind, distinct values, missing cells, and whether it looks like a row id (all distinct). */
export function summarizeColumns(data: Dataset) {
  return data.features.map((feature, j) => {
    const column = data.columns[j]
    const distinct = new Set<number>()
    let isInteger = true
    for (const v of column) {
      if (Number.isNaN(v)) continue
      distinct.add(v)
      if (!Number.isInteger(v)) isInteger = false
    }
    const looksLikeId = data.rows > 20 && distinct.size === data.rows && (feature.kind === 'categorical' || isInteger)
    return { name: feature.name, kind: feature.kind, distinct: distinct.size, missing: data.missing[j], looksLikeId }
  })
}
