/**
 * How plumbline feeds an ONNX model, decided from its declared inputs before anything runs (pure:
 * the adapter turns the values into onnxruntime tensors and calls the session):
 * - One float32/float64 tensor [N, F] whose name is not a data column: the column order comes from
 *   `featureOrder` (the policy's `model.onnx.features`), else from the model's metadata_props key
 *   `plumbline.features` (FEATURES_METADATA_KEY, a JSON array of column names), else a UserError.
 * - Otherwise one input per column, [N, 1] or [N], matched to data columns by name, of element type
 *   float32, float64, int64 or string. Missing values go in as NaN for float inputs; an int64 input
 *   refuses missing and non-whole values. A string input must read a categorical column: the code in
 *   the column is decoded with FeatureInfo.categories, and a missing value becomes the empty string.
 *   A numeric input reading a categorical column gets the code itself (the position in the sorted
 *   dictionary), which is only meaningful to a model trained on the same codes.
 * `featureNames` are the columns the model reads, in the order given above; data columns the model
 * does not read are not among them.
 */
import type { FeatureInfo, FeatureMatrix } from '../data/dataset.ts'
import { InternalError, UserError } from '../errors.ts'
import { FEATURES_METADATA_KEY } from './onnx-proto.ts'
import { describeColumns, describeShape, describeValues, isColumnShape, type OnnxTensorInfo, type OnnxValueInfo } from './onnx-value-info.ts'

export type OnnxColumnType = 'float32' | 'float64' | 'int64' | 'string'

export type OnnxInputPlan =
  | {
      /** One [N, F] matrix (the only form whose trees plumbline can evaluate itself). */
      readonly kind: 'matrix'
      readonly name: string
      readonly type: 'float32' | 'float64'
      readonly featureNames: readonly string[]
    }
  | {
      readonly kind: 'columns'
      /** One input per column, in the model's order; `rank` 1 is [N], 2 is [N, 1]. */
      readonly columns: readonly { readonly name: string; readonly type: OnnxColumnType; readonly rank: 1 | 2 }[]
      readonly featureNames: readonly string[]
    }

/** One input's values, ready to become a tensor of that type and shape. */
export type OnnxInputValues =
  | { readonly type: 'float32'; readonly data: Float32Array; readonly dims: readonly number[] }
  | { readonly type: 'float64'; readonly data: Float64Array; readonly dims: readonly number[] }
  | { readonly type: 'int64'; readonly data: BigInt64Array; readonly dims: readonly number[] }
  | { readonly type: 'string'; readonly data: string[]; readonly dims: readonly number[] }

export interface OnnxInputOptions {
  /** The file the model came from, as the user named it, for messages. */
  readonly source: string
  /** The data's feature columns. */
  readonly features: readonly FeatureInfo[]
  /** Column order of a single [N, F] input (the policy's `model.onnx.features`). */
  readonly featureOrder?: readonly string[]
}

export function planOnnxInputs(inputs: readonly OnnxValueInfo[], options: OnnxInputOptions, metadata: ReadonlyMap<string, string>): OnnxInputPlan {
  const byName = new Map(options.features.map((f) => [f.name, f]))
  const mismatch = (problem: string, fix: string) =>
    new UserError(`${problem}\nModel inputs: ${describeValues(inputs)}\nData columns: ${describeColumns(options.features)}`, fix)
  const perColumnFix =
    `Name each model input after the data column it reads, or export one float input [N, F] and list its columns in order under 'model.onnx.features'.`

  if (inputs.length === 0) throw mismatch(`The ONNX model '${options.source}' has no inputs.`, perColumnFix)
  if (inputs.length === 1 && !byName.has(inputs[0].name)) return planMatrixInput(inputs[0], options, metadata, mismatch)

  for (const input of inputs) {
    const feature = byName.get(input.name)
    if (!feature) throw mismatch(`The ONNX model '${options.source}' has an input '${input.name}' that matches no data column.`, perColumnFix)
    if (!input.isTensor) throw mismatch(`The ONNX model '${options.source}' input '${input.name}' is not a tensor.`, perColumnFix)
    if (!isColumnShape(input.shape)) {
      throw mismatch(
        `The ONNX model '${options.source}' input '${input.name}' has shape ${describeShape(input.shape)}; an input per column must be [N, 1] or [N].`,
        perColumnFix,
      )
    }
    if (!['float32', 'float64', 'int64', 'string'].includes(input.type)) {
      throw mismatch(
        `The ONNX model '${options.source}' input '${input.name}' is ${input.type}; an input per column must be float32, float64, int64 or string.`,
        `Export the model with a float input for '${input.name}'.`,
      )
    }
    if (input.type === 'string' && feature.kind !== 'categorical') {
      throw mismatch(
        `The ONNX model '${options.source}' input '${input.name}' is a string tensor, but data column '${input.name}' is numeric.`,
        `Declare the column categorical under 'data.columns' in plumbline.yml, or export the model with a float input for '${input.name}'.`,
      )
    }
  }
  const columns = (inputs as readonly OnnxTensorInfo[]).map((input) => ({
    name: input.name,
    type: input.type as OnnxColumnType,
    rank: input.shape.length === 1 ? (1 as const) : (2 as const),
  }))
  return { kind: 'columns', columns, featureNames: columns.map((input) => input.name) }
}

/**
 * The input values for rows start..end of `matrix` (whose columns are the plan's featureNames in
 * order), keyed by input name. Refuses, naming the row, a missing or fractional value for an int64 input.
 */
export function onnxInputValues(plan: OnnxInputPlan, matrix: FeatureMatrix, start: number, end: number, source: string): Record<string, OnnxInputValues> {
  const rows = end - start
  if (plan.kind === 'matrix') {
    const width = matrix.columns.length
    const data = plan.type === 'float32' ? new Float32Array(rows * width) : new Float64Array(rows * width)
    for (let j = 0; j < width; j++) {
      const column = matrix.columns[j]
      for (let i = 0; i < rows; i++) data[i * width + j] = column[start + i]
    }
    const dims = [rows, width]
    return { [plan.name]: data instanceof Float32Array ? { type: 'float32', data, dims } : { type: 'float64', data, dims } }
  }
  const values: Record<string, OnnxInputValues> = {}
  plan.columns.forEach((input, j) => {
    values[input.name] = columnValues(input, matrix.features[j], matrix.columns[j], start, end, source)
  })
  return values
}

function planMatrixInput(
  input: OnnxValueInfo,
  options: OnnxInputOptions,
  metadata: ReadonlyMap<string, string>,
  mismatch: (problem: string, fix: string) => UserError,
): OnnxInputPlan {
  const { source } = options
  const orderFix = `List the columns in order under 'model.onnx.features' in plumbline.yml, or store them in the model as metadata '${FEATURES_METADATA_KEY}' (a JSON array of column names).`
  if (!input.isTensor || (input.type !== 'float32' && input.type !== 'float64')) {
    throw mismatch(
      `The ONNX model '${source}' input '${input.name}' is ${input.isTensor ? input.type : 'not a tensor'}; a single input [N, F] must be a float32 or float64 tensor.`,
      `Export the model with a float input, or with one input per data column named after the column.`,
    )
  }
  if (input.shape.length !== 2) {
    throw mismatch(`The ONNX model '${source}' input '${input.name}' has shape ${describeShape(input.shape)}; a single input must be [N, F].`, orderFix)
  }
  let order: readonly string[]
  let origin: string
  const stored = metadata.get(FEATURES_METADATA_KEY)
  if (options.featureOrder) {
    order = options.featureOrder
    origin = `'model.onnx.features'`
  } else if (stored !== undefined) {
    order = parseStoredOrder(stored, source)
    origin = `its metadata '${FEATURES_METADATA_KEY}'`
  } else {
    throw mismatch(`The ONNX model '${source}' takes one input '${input.name}' ${describeShape(input.shape)} and does not say which data column goes in which position.`, orderFix)
  }
  const seen = new Set<string>()
  for (const name of order) {
    if (seen.has(name)) throw mismatch(`The column order for the ONNX model '${source}' (${origin}) lists '${name}' twice.`, orderFix)
    seen.add(name)
  }
  const byName = new Map(options.features.map((f) => [f.name, f]))
  const unknown = order.find((name) => !byName.has(name))
  if (unknown !== undefined) {
    throw mismatch(`The ONNX model '${source}' reads column '${unknown}' (from ${origin}), which the data does not have.`, orderFix)
  }
  const width = input.shape[1]
  if (typeof width === 'number' && width >= 0 && width !== order.length) {
    throw mismatch(`The ONNX model '${source}' input '${input.name}' takes ${width} columns, but ${origin} lists ${order.length}.`, orderFix)
  }
  return { kind: 'matrix', name: input.name, type: input.type, featureNames: order }
}

function parseStoredOrder(text: string, source: string): readonly string[] {
  let parsed: unknown
  try {
    parsed = JSON.parse(text)
  } catch {
    parsed = undefined
  }
  if (!Array.isArray(parsed) || !parsed.every((name) => typeof name === 'string')) {
    throw new UserError(
      `The ONNX model '${source}' has metadata '${FEATURES_METADATA_KEY}' that is not a JSON array of column names: ${text.slice(0, 200)}`,
      `Store the column order as a JSON array such as ["distance_km", "stop_count"], or list it under 'model.onnx.features' in plumbline.yml.`,
    )
  }
  return parsed as string[]
}

function columnValues(
  input: { readonly name: string; readonly type: OnnxColumnType; readonly rank: 1 | 2 },
  feature: FeatureInfo,
  column: Float64Array,
  start: number,
  end: number,
  source: string,
): OnnxInputValues {
  const rows = end - start
  const dims = input.rank === 1 ? [rows] : [rows, 1]
  switch (input.type) {
    case 'float32':
      return { type: 'float32', data: Float32Array.from(column.subarray(start, end)), dims }
    case 'float64':
      return { type: 'float64', data: column.slice(start, end), dims }
    case 'int64': {
      const data = new BigInt64Array(rows)
      for (let i = 0; i < rows; i++) {
        const value = column[start + i]
        if (!Number.isInteger(value)) {
          const what = Number.isNaN(value) ? 'a missing value' : `the value ${value}`
          throw new UserError(
            `The ONNX model '${source}' takes column '${input.name}' as int64, but the data has ${what} there (row ${start + i + 1} of the rows scored).`,
            `Export the model with a float input for '${input.name}' (float inputs take missing values as NaN), or fill in the column before training and scoring.`,
          )
        }
        data[i] = BigInt(value)
      }
      return { type: 'int64', data, dims }
    }
    case 'string': {
      const categories = feature.categories
      if (feature.kind !== 'categorical' || !categories) {
        throw new RangeError(`onnxInputValues: column '${input.name}' feeds a string input but is not categorical with a dictionary`)
      }
      const data: string[] = new Array(rows)
      for (let i = 0; i < rows; i++) {
        const code = column[start + i]
        if (Number.isNaN(code)) {
          data[i] = ''
        } else {
          const label = categories[code]
          if (label === undefined) throw new InternalError(`column '${input.name}' has code ${code} outside its ${categories.length} categories`)
          data[i] = label
        }
      }
      return { type: 'string', data, dims }
    }
    default:
      throw new InternalError(`unplanned input type ${String(input.type)}`)
  }
}
