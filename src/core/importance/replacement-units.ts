import type { FeatureMatrix } from '../data/dataset.ts'

/** A feature, or a group replaced jointly, with the column indices it replaces in the model's matrix. */
export interface ReplacementUnit {
  readonly name: string
  readonly members: string[]
  readonly isGroup: boolean
  readonly columns: number[]
}

/**
 * The units replacement-based measures loop over: every model feature, then each group whose
 * members the model all uses (a group with a missing member is skipped), in group order.
 */
export function replacementUnits(
  names: readonly string[],
  groups: readonly { readonly name: string; readonly members: readonly string[] }[] = [],
): ReplacementUnit[] {
  const position = new Map(names.map((name, j) => [name, j]))
  const units: ReplacementUnit[] = names.map((name, j) => ({ name, members: [name], isGroup: false, columns: [j] }))
  for (const group of groups) {
    const columns = group.members.map((m) => position.get(m))
    if (columns.some((c) => c === undefined)) continue // the model does not use every member
    units.push({ name: group.name, members: [...group.members], isGroup: true, columns: columns as number[] })
  }
  return units
}

/**
 * K copies of the rows stacked column by column (copy k at offset k·n), allocated once per call, for
 * models without a replacement fast path; with a fast path, no columns (the path needs none).
 */
export function stackedCopies(data: FeatureMatrix, draws: number, hasFastPath: boolean): FeatureMatrix {
  const rows = data.rows * draws
  const columns = hasFastPath
    ? []
    : data.columns.map((column) => {
        const out = new Float64Array(rows)
        for (let k = 0; k < draws; k++) out.set(column, k * data.rows)
        return out
      })
  return { rows, features: data.features, columns }
}
