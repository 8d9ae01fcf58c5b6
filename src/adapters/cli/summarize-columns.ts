import type { Dataset } from '../../core/data/dataset.ts'
import { profileColumn } from '../../core/data/profile-column.ts'

/** Per column: kind, distinct values, missing cells, and whether it looks like a row id (all distinct). */
export function summarizeColumns(data: Dataset) {
  return data.features.map((feature, j) => {
    const { distinct, wholeNumbers } = profileColumn(data.columns[j])
    const looksLikeId = data.rows > 20 && distinct === data.rows && (feature.kind === 'categorical' || wholeNumbers)
    return { name: feature.name, kind: feature.kind, distinct, missing: data.missing[j], looksLikeId }
  })
}
