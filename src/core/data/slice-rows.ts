import type { SliceFilter } from '../config.ts'
import { UserError } from '../errors.ts'
import type { FeatureMatrix } from './dataset.ts'

/**
 * The rows of `data` a slice filter keeps, in row order. A comparison reads one feature column:
 * `equals` / `in` compare a categorical column's category text, or a numeric column's value (the
 * text must then be a number); `at_least`, `below` and `between` ([low, high)) need a numeric
 * column; `is_missing` keeps the rows whose cell is missing (or, with false, present). A missing
 * value satisfies no comparison but `is_missing`. `all_of` keeps rows every filter keeps, `any_of`
 * rows some filter keeps.
 *
 * Returns null when a column the filter names is not a feature of `data` (the caller decides
 * whether that side can go without the slice). Refuses with a UserError naming the slice and the
 * policy key: a range comparison of a categorical column, or equals / in with text on a numeric
 * column. Cost O(rows × comparisons).
 */
export function sliceRows(data: FeatureMatrix, filter: SliceFilter, slice: { readonly name: string; readonly index: number }): Uint32Array | null {
  const keep = evaluate(data, filter, slice, `slices[${slice.index}].where`)
  if (!keep) return null
  let count = 0
  for (let i = 0; i < data.rows; i++) if (keep[i]) count++
  const rows = new Uint32Array(count)
  for (let i = 0, k = 0; i < data.rows; i++) if (keep[i]) rows[k++] = i
  return rows
}

/** The columns a filter names, in the order written. */
export function sliceColumns(filter: SliceFilter): string[] {
  if ('allOf' in filter) return filter.allOf.flatMap(sliceColumns)
  if ('anyOf' in filter) return filter.anyOf.flatMap(sliceColumns)
  return [filter.column]
}

/** The filter in words, for the report: "depot = harbour and distance_km ≥ 20". */
export function describeSliceFilter(filter: SliceFilter): string {
  const part = (f: SliceFilter, nested: boolean): string => {
    if ('allOf' in f || 'anyOf' in f) {
      const items = 'allOf' in f ? f.allOf : f.anyOf
      const text = items.map((g) => part(g, true)).join('allOf' in f ? ' and ' : ' or ')
      return nested && items.length > 1 ? `(${text})` : text
    }
    if (f.equals !== undefined) return `${f.column} = ${f.equals}`
    if (f.in !== undefined) return `${f.column} in {${f.in.join(', ')}}`
    if (f.atLeast !== undefined) return `${f.column} ≥ ${f.atLeast}`
    if (f.below !== undefined) return `${f.column} < ${f.below}`
    if (f.between !== undefined) return `${f.between[0]} ≤ ${f.column} < ${f.between[1]}`
    return `${f.column} is ${f.isMissing ? '' : 'not '}missing`
  }
  return part(filter, false)
}

function evaluate(data: FeatureMatrix, filter: SliceFilter, slice: { readonly name: string }, key: string): Uint8Array | null {
  if ('allOf' in filter || 'anyOf' in filter) {
    const all = 'allOf' in filter
    const items = all ? filter.allOf : filter.anyOf
    const out = new Uint8Array(data.rows).fill(all ? 1 : 0)
    for (let k = 0; k < items.length; k++) {
      const part = evaluate(data, items[k], slice, `${key}.${all ? 'all_of' : 'any_of'}[${k}]`)
      if (!part) return null
      for (let i = 0; i < data.rows; i++) out[i] = all ? out[i] & part[i] : out[i] | part[i]
    }
    return out
  }
  const j = data.features.findIndex((f) => f.name === filter.column)
  if (j < 0) return null
  const feature = data.features[j]
  const column = data.columns[j]
  const out = new Uint8Array(data.rows)
  if (filter.isMissing !== undefined) {
    for (let i = 0; i < data.rows; i++) out[i] = Number.isNaN(column[i]) === filter.isMissing ? 1 : 0
    return out
  }
  const refuse = (which: string, problem: string, fix: string): never => {
    throw new UserError(`The slice '${slice.name}': ${key}.${which} ${problem}`, fix)
  }
  if (filter.equals !== undefined || filter.in !== undefined) {
    const which = filter.equals !== undefined ? 'equals' : 'in'
    const values = filter.equals !== undefined ? [filter.equals] : filter.in!
    const codes = new Set<number>()
    for (const v of values) {
      if (feature.kind === 'categorical') {
        const code = feature.categories!.indexOf(v)
        if (code >= 0) codes.add(code)
      } else {
        const x = Number(v)
        if (v.trim() === '' || !Number.isFinite(x)) {
          refuse(which, `compares the numeric column '${feature.name}' with '${v}', which is not a number.`, `Write a number, or give '${feature.name}' the role categorical in data.columns.`)
        }
        codes.add(x)
      }
    }
    for (let i = 0; i < data.rows; i++) out[i] = codes.has(column[i]) ? 1 : 0
    return out
  }
  const which = filter.atLeast !== undefined ? 'at_least' : filter.below !== undefined ? 'below' : 'between'
  if (feature.kind === 'categorical') {
    refuse(which, `compares the categorical column '${feature.name}' by size; categories have no order.`, `Use equals or in with its categories (${(feature.categories ?? []).slice(0, 10).join(', ')}).`)
  }
  const [low, high] =
    filter.atLeast !== undefined ? [filter.atLeast, Infinity] : filter.below !== undefined ? [-Infinity, filter.below] : [filter.between![0], filter.between![1]]
  const includeHigh = high === Infinity
  for (let i = 0; i < data.rows; i++) {
    const v = column[i]
    out[i] = v >= low && (v < high || (includeHigh && v === Infinity)) ? 1 : 0
  }
  return out
}
