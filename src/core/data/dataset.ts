/**
 * The columnar dataset every part of the core reads. Column-major: one Float64Array per column, so
 * that replacing one feature for permutation importance copies one array, not every row.
 */

export type Task = 'binary' | 'regression' | 'multiclass'

/** What a column is for. Declared roles override inference; `ignore` drops a column entirely. */
export type ColumnRole = 'numeric' | 'categorical' | 'id' | 'ignore' | 'target'

/** A model input's description; the values live in `FeatureMatrix.columns`. */
export interface FeatureInfo {
  readonly name: string
  readonly kind: 'numeric' | 'categorical'
  /** Categorical only: the dictionary, sorted; code i in the column means categories[i]. */
  readonly categories?: readonly string[]
}

/** Column-major model input: columns[j][i] is row i of feature j. Missing values are NaN. */
export interface FeatureMatrix {
  readonly rows: number
  readonly features: readonly FeatureInfo[]
  readonly columns: readonly Float64Array[]
}

export interface Target {
  readonly name: string
  /**
   * Regression: the value. Binary: 0 or 1, where 1 is `classes[1]` (the positive class). Multiclass:
   * the class index 0..K-1 into `classes`.
   */
  readonly values: Float64Array
  /**
   * Binary: [negative, positive] as written in the file. Multiclass: the K >= 3 labels as written,
   * in numeric order when every label is a number, else in text order (UTF-16 code units); class k
   * is classes[k], and a model's probability column k is that class.
   */
  readonly classes?: readonly string[]
}

export interface Dataset extends FeatureMatrix {
  /** Where the rows came from, as the user named it (a file path), for messages. */
  readonly source: string
  /** Missing cells per feature column, aligned with `features`. */
  readonly missing: readonly number[]
  readonly target?: Target
  readonly ids?: { readonly name: string; readonly values: readonly string[] }
  /**
   * Only for a file read against another file's schema (`parseCsv` with `schema`): per categorical
   * feature with at least one, how many cells held a category the schema's dictionary lacks. Those
   * cells are NaN in `columns` but not counted in `missing`.
   */
  readonly unseenCategories?: Readonly<Record<string, number>>
  /** Only with a schema: columns in the file that the schema does not have, left out, in file order. */
  readonly extraColumns?: readonly string[]
}

/** The rows `indices` of a dataset, in that order (ids and target follow). */
export function selectRows<T extends FeatureMatrix>(data: T & Partial<Dataset>, indices: ArrayLike<number>): T {
  const take = (values: Float64Array) => {
    const out = new Float64Array(indices.length)
    for (let i = 0; i < indices.length; i++) out[i] = values[indices[i]]
    return out
  }
  const result: { [key: string]: unknown } = {
    ...(data as object),
    rows: indices.length,
    columns: data.columns.map(take),
  }
  if (data.target) result.target = { ...data.target, values: take(data.target.values) }
  if (data.ids) result.ids = { ...data.ids, values: Array.from(indices, (i) => data.ids!.values[i]) }
  return result as unknown as T
}

/** The same rows with only the named features, in the order given. Throws RangeError on an unknown name. */
export function selectFeatures<T extends FeatureMatrix>(data: T, names: readonly string[]): T {
  const index = new Map(data.features.map((f, j) => [f.name, j]))
  const picked = names.map((name) => {
    const j = index.get(name)
    if (j === undefined) throw new RangeError(`selectFeatures: no feature named '${name}'`)
    return j
  })
  const result: { [key: string]: unknown } = {
    ...(data as object),
    features: picked.map((j) => data.features[j]),
    columns: picked.map((j) => data.columns[j]),
  }
  if ('missing' in data && Array.isArray((data as Partial<Dataset>).missing)) {
    result.missing = picked.map((j) => (data as unknown as Dataset).missing[j])
  }
  return result as unknown as T
}
