/**
 * Loads an ONNX model (from any framework that exports one) as a plumbline Model, run by
 * onnxruntime-node on the CPU.
 *
 * Inputs, decided from the model's declared inputs:
 * - One float32/float64 tensor [N, F] whose name is not a data column: the column order comes from
 *   `featureOrder` (the policy's `model.onnx.features`), else from the model's metadata_props key
 *   `plumbline.features` (FEATURES_METADATA_KEY, a JSON array of column names), else a UserError.
 * - Otherwise one input per column, [N, 1] or [N], matched to data columns by name, of element type
 *   float32, float64, int64 or string. Missing values go in as NaN for float inputs; an int64 input
 *   refuses missing and non-whole values. A string input must read a categorical column: the code in
 *   the column is decoded with FeatureInfo.categories, and a missing value becomes the empty string.
 *   A numeric input reading a categorical column gets the code itself (the position in the sorted
 *   dictionary), which is only meaningful to a model trained on the same codes.
 * `featureNames` of the Model are the columns the model reads, in the order given above; data
 * columns the model does not read are not among them.
 *
 * Outputs:
 * - regression: the single float tensor output, [N] or [N, 1].
 * - binary: a float tensor [N, 2] of class probabilities: the output named `probabilities`, else the
 *   only float output declared [N, 2], else the only float output. The positive column is
 *   `positiveClass` looked up among the labels the model declares (classlabels_strings /
 *   classlabels_int64s of the classifier node; a number is a label when the model declares integer
 *   labels, otherwise a column index 0 or 1); without `positiveClass`, the column whose declared label
 *   is 1 (or "1"), else column 1. A caller that knows the data's positive class should pass it.
 *   Probabilities outside [0, 1] are refused at predict time; NaN passes through.
 * - multiclass: a float tensor [N, K] of class probabilities (K = the data's classes, `classes`): the
 *   output named `probabilities`, else the only float output declared [N, K], else the only float
 *   output. Column k of the Model's [N, K] predictions is data class k: found by label among the
 *   labels the model declares (compared as text, so integer labels 0, 1, 2 match the classes '0',
 *   '1', '2'), or, for a model without labels, the model's column k (the classes in their sorted
 *   order, see Target.classes). Every value must be a probability and every row sum to 1 (within
 *   1e-4): raw scores are refused.
 * - Sequence-of-map outputs (ZipMap) are refused with a message on exporting plain tensors.
 *
 * predict runs the session over chunks of `batchRows` rows (default 65536), so the input and output
 * tensors stay bounded whatever the number of rows, and concatenates into one Float64Array.
 *
 * Tree ensembles (see parseOnnxTreeEnsemble for the graphs it reads) are evaluated by plumbline's
 * own tree evaluator instead, which also gives permutation importance its fast path; the Model's
 * `engine` says which ran ('plumbline-trees' or 'onnxruntime'). The first predict call compares the
 * two on up to 2048 rows and keeps onnxruntime for good if they differ by more than 1e-5 relative.
 * A multiclass TreeEnsembleClassifier (post_transform NONE or SOFTMAX) is read by
 * parseOnnxClassEnsembles into one ensemble per class, under the same check.
 */
import ort from 'onnxruntime-node'
import type { FeatureInfo, FeatureMatrix, Task } from '../../core/data/dataset.ts'
import { InternalError, UserError } from '../../core/errors.ts'
import type { Model, ModelEngine } from '../../core/models/model.ts'
import { FEATURES_METADATA_KEY } from '../../core/models/onnx-proto.ts'
import { parseOnnxTreeEnsemble } from '../../core/models/parse-onnx-tree-ensemble.ts'
import { createTreeReplacementPredictor, type EvaluableEnsemble } from '../../core/models/gbt/replacement-predictor.ts'
import { createClassEnsemblesPredictor, type ClassEnsembles } from '../../core/models/gbt/class-ensembles-predictor.ts'
import { parseOnnxClassEnsembles } from '../../core/models/parse-onnx-class-ensembles.ts'
import { selectRows } from '../../core/data/dataset.ts'
import { readOnnxSummary, type OnnxSummary } from './read-onnx-summary.ts'

export { FEATURES_METADATA_KEY }

export const DEFAULT_BATCH_ROWS = 65536

export interface OnnxModelOptions {
  /** The file the bytes came from, as the user named it, for messages. */
  readonly source: string
  readonly task: Task
  /** The data's feature columns. */
  readonly features: readonly FeatureInfo[]
  /** Column order of a single [N, F] input (the policy's `model.onnx.features`); unused when the model takes one input per column. */
  readonly featureOrder?: readonly string[]
  /** Multiclass: the data's class labels in order (Target.classes); the Model's column k is classes[k]. */
  readonly classes?: readonly string[]
  /** The positive class: a declared label, or a probability column index (see the module comment). */
  readonly positiveClass?: string | number
  /** Rows per session run; default DEFAULT_BATCH_ROWS. */
  readonly batchRows?: number
  /** 'onnxruntime' keeps every prediction with onnxruntime even for a tree ensemble plumbline can read (default 'auto'). */
  readonly evaluator?: 'auto' | 'onnxruntime'
}

type ValueMetadata = ort.InferenceSession.ValueMetadata
type Tensor = ort.Tensor
type Feeds = Record<string, Tensor>

interface InputPlan {
  readonly featureNames: readonly string[]
  /** The model takes one [N, F] matrix (the only form whose trees plumbline can evaluate itself). */
  readonly isMatrix: boolean
  build(matrix: FeatureMatrix, start: number, end: number): Feeds
}

interface OutputPlan {
  readonly name: string
  /** Binary: the probability column of the positive class. */
  readonly positive?: number
  /** Multiclass: values per row (K), and the model's column of data class k at k. */
  readonly width?: number
  readonly columns?: readonly number[]
  copy(value: ort.OnnxValue, start: number, end: number, out: Float64Array): void
}

export async function loadOnnxModel(bytes: Uint8Array, options: OnnxModelOptions): Promise<Model> {
  const batchRows = options.batchRows ?? DEFAULT_BATCH_ROWS
  if (!Number.isInteger(batchRows) || batchRows < 1) {
    throw new RangeError(`loadOnnxModel needs batchRows to be a whole number >= 1, got ${batchRows}`)
  }
  let session: ort.InferenceSession
  try {
    session = await ort.InferenceSession.create(bytes, { executionProviders: ['cpu'] })
  } catch (error) {
    throw new UserError(
      `Could not load the ONNX model '${options.source}': ${error instanceof Error ? error.message : String(error)}`,
      `Check that '${options.source}' is a complete .onnx file: export it again, and if it is stored with Git LFS, check it out with LFS so that the file is not a pointer.`,
    )
  }
  let summary: OnnxSummary
  try {
    summary = readOnnxSummary(bytes)
  } catch (error) {
    // onnxruntime accepted the graph, but its metadata or labels are not valid protobuf / UTF-8.
    throw new UserError(
      `The ONNX model '${options.source}' has metadata or class labels that cannot be read (${error instanceof Error ? error.message.slice(0, 120) : 'unreadable'}).`,
      `Export '${options.source}' again; a file changed after export (or stored as a Git LFS pointer) reads this way.`,
    )
  }
  const inputs = planInputs(session.inputMetadata, options, summary)
  const output = options.task === 'regression'
    ? planRegressionOutput(session.outputMetadata, options.source)
    : options.task === 'multiclass'
      ? planClassOutput(session.outputMetadata, options, summary)
      : planProbabilityOutput(session.outputMetadata, options, summary)
  const width = output.width ?? 1
  const { source } = options
  const featureNames = inputs.featureNames
  // A tree ensemble plumbline can read is evaluated by its own tree evaluator (exact routing, double
  // sums) and gets the permutation fast path; the first predict call checks it against onnxruntime
  // on up to CHECK_ROWS rows and falls back to onnxruntime for good on any disagreement.
  const parsed = inputs.isMatrix && options.evaluator !== 'onnxruntime' ? readTrees(bytes, options.task, output) : undefined
  let trees: EvaluableEnsemble | ClassEnsembles | undefined =
    options.task === 'multiclass'
      ? inputs.isMatrix && options.evaluator !== 'onnxruntime' ? readClassTrees(bytes, output, featureNames) : undefined
      : parsed?.ok && parsed.width <= featureNames.length ? { ...parsed.ensemble, featureNames } : undefined
  let checked = false
  let engine: ModelEngine = trees ? 'plumbline-trees' : 'onnxruntime'
  const fastPath = (ensemble: EvaluableEnsemble | ClassEnsembles, matrix: FeatureMatrix) =>
    'classes' in ensemble ? createClassEnsemblesPredictor(ensemble, matrix) : createTreeReplacementPredictor(ensemble, matrix)
  const evaluate = (matrix: FeatureMatrix, ensemble: EvaluableEnsemble | ClassEnsembles) => fastPath(ensemble, matrix)?.predict(new Map(), 1)

  const runSession = async (matrix: FeatureMatrix): Promise<Float64Array> => {
    const out = new Float64Array(matrix.rows * width)
      for (let start = 0; start < matrix.rows; start += batchRows) {
        const end = Math.min(matrix.rows, start + batchRows)
        const feeds = inputs.build(matrix, start, end)
        let result: ort.InferenceSession.ReturnType
        try {
          result = await session.run(feeds, [output.name])
        } catch (error) {
          throw new UserError(
            `The ONNX model '${source}' failed on rows ${start + 1} to ${end} of the data: ${error instanceof Error ? error.message : String(error)}`,
          )
        }
        output.copy(result[output.name], start, end, out)
      }
      return out
  }

  return {
    kind: 'onnx',
    task: options.task,
    featureNames,
    ...(options.task === 'multiclass' ? { classCount: width } : {}),
    get engine() {
      return engine
    },
    async predict(matrix: FeatureMatrix): Promise<Float64Array> {
      if (matrix.features.length !== featureNames.length || matrix.features.some((f, j) => f.name !== featureNames[j])) {
        throw new RangeError(
          `predict needs the features ${JSON.stringify(featureNames)} in that order, got ${JSON.stringify(matrix.features.map((f) => f.name))}`,
        )
      }
      if (trees && !checked) {
        checked = true
        const sample = selectRows(matrix, Array.from({ length: Math.min(CHECK_ROWS, matrix.rows) }, (_, i) => i))
        const ours = evaluate(sample, trees)
        const theirs = await runSession(sample)
        if (!ours || ours.some((p, i) => !(Math.abs(p - theirs[i]) <= AGREEMENT * Math.max(1, Math.abs(theirs[i]))))) {
          trees = undefined
          engine = 'onnxruntime'
        }
      }
      if (trees) {
        const values = evaluate(matrix, trees)!
        if (options.task === 'multiclass') return asClassProbabilities(values, width, options.source)
        return options.task === 'binary' ? asProbabilities(values, options.source) : values
      }
      return runSession(matrix)
    },
    createReplacementPredictor(base: FeatureMatrix) {
      return trees && checked ? fastPath(trees, base) : undefined
    },
  }
}

/** Rows the tree evaluator is checked on against onnxruntime at the first prediction. */
const CHECK_ROWS = 2048
/** Largest difference allowed in that check, relative (onnxruntime's tree outputs are float32: ~6e-8). */
const AGREEMENT = 1e-5

// ---- inputs -------------------------------------------------------------------------------------

function planInputs(inputs: readonly ValueMetadata[], options: OnnxModelOptions, summary: OnnxSummary): InputPlan {
  const byName = new Map(options.features.map((f) => [f.name, f]))
  const mismatch = (problem: string, fix: string) =>
    new UserError(`${problem}\nModel inputs: ${describeValues(inputs)}\nData columns: ${describeColumns(options.features)}`, fix)
  const perColumnFix =
    `Name each model input after the data column it reads, or export one float input [N, F] and list its columns in order under 'model.onnx.features'.`

  if (inputs.length === 0) throw mismatch(`The ONNX model '${options.source}' has no inputs.`, perColumnFix)
  if (inputs.length === 1 && !byName.has(inputs[0].name)) return planMatrixInput(inputs[0], options, summary, mismatch)

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
  const columns = inputs as readonly ort.InferenceSession.TensorValueMetadata[]
  return {
    isMatrix: false,
    featureNames: columns.map((input) => input.name),
    build(matrix, start, end) {
      const feeds: Feeds = {}
      columns.forEach((input, j) => {
        feeds[input.name] = columnTensor(input, matrix.features[j], matrix.columns[j], start, end, options.source)
      })
      return feeds
    },
  }
}

function planMatrixInput(
  input: ValueMetadata,
  options: OnnxModelOptions,
  summary: OnnxSummary,
  mismatch: (problem: string, fix: string) => UserError,
): InputPlan {
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
  const stored = summary.metadata.get(FEATURES_METADATA_KEY)
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
  const type = input.type
  return {
    isMatrix: true,
    featureNames: order,
    build(matrix, start, end) {
      const rows = end - start
      const width = matrix.columns.length
      const data = type === 'float32' ? new Float32Array(rows * width) : new Float64Array(rows * width)
      for (let j = 0; j < width; j++) {
        const column = matrix.columns[j]
        for (let i = 0; i < rows; i++) data[i * width + j] = column[start + i]
      }
      return { [input.name]: new ort.Tensor(type, data, [rows, width]) }
    },
  }
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

function isColumnShape(shape: ReadonlyArray<number | string>): boolean {
  if (shape.length === 1) return true
  return shape.length === 2 && (shape[1] === 1 || typeof shape[1] === 'string' || shape[1] < 0)
}

function columnTensor(
  input: ort.InferenceSession.TensorValueMetadata,
  feature: FeatureInfo,
  column: Float64Array,
  start: number,
  end: number,
  source: string,
): Tensor {
  const rows = end - start
  const dims = input.shape.length === 1 ? [rows] : [rows, 1]
  switch (input.type) {
    case 'float32':
      return new ort.Tensor('float32', Float32Array.from(column.subarray(start, end)), dims)
    case 'float64':
      return new ort.Tensor('float64', column.slice(start, end), dims)
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
      return new ort.Tensor('int64', data, dims)
    }
    case 'string': {
      const categories = feature.categories
      if (feature.kind !== 'categorical' || !categories) {
        throw new RangeError(`predict: column '${input.name}' feeds a string input but is not categorical with a dictionary`)
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
      return new ort.Tensor('string', data, dims)
    }
    default:
      throw new InternalError(`unplanned input type ${input.type}`)
  }
}

// ---- outputs ------------------------------------------------------------------------------------

const isFloatTensor = (value: ValueMetadata): value is ort.InferenceSession.TensorValueMetadata =>
  value.isTensor && (value.type === 'float32' || value.type === 'float64')

function outputError(problem: string, outputs: readonly ValueMetadata[], fix: string): UserError {
  return new UserError(`${problem}\nModel outputs: ${describeValues(outputs)}`, fix)
}

function planRegressionOutput(outputs: readonly ValueMetadata[], source: string): OutputPlan {
  const floats = outputs.filter(isFloatTensor)
  const fix = `Export the regressor with exactly one float output holding one prediction per row, [N] or [N, 1].`
  if (floats.length !== 1) {
    throw outputError(`The ONNX model '${source}' has ${floats.length} float tensor outputs; a regression model needs exactly one.`, outputs, fix)
  }
  const output = floats[0]
  if (!(output.shape.length === 0 || isColumnShape(output.shape))) {
    throw outputError(`The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; a regression output must be [N] or [N, 1].`, outputs, fix)
  }
  return {
    name: output.name,
    copy(value, start, end, out) {
      const tensor = value as Tensor
      const rows = end - start
      const dims = tensor.dims
      if (!(dims[0] === rows && (dims.length === 1 || (dims.length === 2 && dims[1] === 1)))) {
        throw outputError(`The ONNX model '${source}' output '${output.name}' came back with shape [${dims.join(', ')}] for ${rows} rows; a regression output must be [N] or [N, 1].`, outputs, fix)
      }
      out.set(tensor.data as Float32Array | Float64Array, start)
    },
  }
}

function planProbabilityOutput(outputs: readonly ValueMetadata[], options: OnnxModelOptions, summary: OnnxSummary): OutputPlan {
  const { source } = options
  const fix = `Export the classifier with an output holding the class probabilities as a float tensor [N, 2] (name it 'probabilities' if it has several float outputs).`
  const floats = outputs.filter(isFloatTensor)
  const declaredPairs = floats.filter((o) => o.shape.length === 2 && o.shape[1] === 2)
  const output = floats.find((o) => o.name === 'probabilities') ?? (declaredPairs.length === 1 ? declaredPairs[0] : floats.length === 1 ? floats[0] : undefined)
  if (!output) {
    const maps = outputs.filter((o) => !o.isTensor)
    if (maps.length > 0) {
      throw outputError(
        `The ONNX model '${source}' returns its class probabilities as a sequence of maps (output '${maps[0].name}'), which plumbline cannot read.`,
        outputs,
        `Export the probabilities as a plain float tensor [N, 2] instead: leave out the final ZipMap step that turns them into maps (in skl2onnx, the converter option zipmap=False).`,
      )
    }
    throw outputError(`The ONNX model '${source}' has no float tensor output of class probabilities [N, 2].`, outputs, fix)
  }
  const width = output.shape[1]
  if (output.shape.length !== 2 || (typeof width === 'number' && width >= 0 && width !== 2)) {
    throw outputError(`The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; a binary model's probabilities must be [N, 2].`, outputs, fix)
  }
  const labels = summary.classLabelsByOutput.get(output.name) ?? (summary.classLabelSets.length === 1 ? summary.classLabelSets[0] : undefined)
  const positive = positiveColumn(options.positiveClass, labels, source, output.name)
  return {
    name: output.name,
    positive,
    copy(value, start, end, out) {
      const tensor = value as Tensor
      const rows = end - start
      if (!(tensor.dims.length === 2 && tensor.dims[0] === rows && tensor.dims[1] === 2)) {
        throw outputError(`The ONNX model '${source}' output '${output.name}' came back with shape [${tensor.dims.join(', ')}] for ${rows} rows; a binary model's probabilities must be [N, 2].`, outputs, fix)
      }
      const data = tensor.data as Float32Array | Float64Array
      // Class fractions averaged over trees in float32 can land a few units in the last place beyond
      // [0, 1] (1.0000003576 is 1 + 3 float32 ulps); that is rounding, clamped. A real score is refused.
      const slack = probabilitySlack(data)
      for (let i = 0; i < rows; i++) {
        const raw = data[2 * i + positive]
        const p = raw < 0 && raw >= -slack ? 0 : raw > 1 && raw <= 1 + slack ? 1 : raw
        if (!(p >= 0 && p <= 1)) {
          throw new UserError(
            `The ONNX model '${source}' output '${output.name}' is not a probability: row ${start + i + 1} of the rows scored has ${p}.`,
            `Export the model with its probability step (a sigmoid or softmax post-transform), not raw scores.`,
          )
        }
        out[start + i] = p
      }
    },
  }
}

/**
 * The tree evaluator's binary output, held to the rule the onnxruntime path applies: leaf values are
 * float32 in the model, so a class fraction a few float32 units beyond [0, 1] is rounding, clamped;
 * anything further out is not a probability and is refused.
 */
function asProbabilities(values: Float64Array, source: string): Float64Array {
  const slack = 16 * 2 ** -23
  for (let i = 0; i < values.length; i++) {
    const raw = values[i]
    const p = raw < 0 && raw >= -slack ? 0 : raw > 1 && raw <= 1 + slack ? 1 : raw
    if (!(p >= 0 && p <= 1)) {
      throw new UserError(
        `The ONNX model '${source}' does not give probabilities: row ${i + 1} of the rows scored has ${raw}.`,
        `Export the model with its probability step (a sigmoid or softmax post-transform), not raw scores.`,
      )
    }
    values[i] = p
  }
  return values
}

/** 16 machine epsilons of the tensor's float type: float32 sums of up to a few hundred terms stay within it. */
export function probabilitySlack(data: Float32Array | Float64Array): number {
  return 16 * (data instanceof Float32Array ? 2 ** -23 : Number.EPSILON)
}

/** The probability column of the positive class (see the module comment for the rules). */
function positiveColumn(positiveClass: string | number | undefined, labels: readonly (string | number)[] | undefined, source: string, outputName: string): number {
  const listed = labels?.map((l) => `'${l}'`).join(', ')
  if (positiveClass === undefined) {
    const one = labels?.findIndex((l) => l === 1 || l === '1') ?? -1
    return one >= 0 && labels!.length === 2 ? one : 1
  }
  const integerLabels = labels !== undefined && labels.every((l) => typeof l === 'number')
  if (typeof positiveClass === 'string' || integerLabels) {
    if (!labels) {
      throw new UserError(
        `positive_class '${positiveClass}' cannot be looked up: the ONNX model '${source}' declares no class labels for its output '${outputName}'.`,
        `Set 'model.onnx.positive_class' to the probability column of the positive class, 0 or 1.`,
      )
    }
    const column = labels.findIndex((l) => String(l) === String(positiveClass))
    if (column < 0 || column > 1) {
      throw new UserError(
        `positive_class '${positiveClass}' is not one of the classes the ONNX model '${source}' declares: ${listed}.`,
        `Set 'model.onnx.positive_class' to one of those labels${integerLabels ? '' : ', or to the probability column 0 or 1'}.`,
      )
    }
    return column
  }
  if (positiveClass !== 0 && positiveClass !== 1) {
    throw new UserError(
      `positive_class ${positiveClass} is not a probability column of the ONNX model '${source}': its output '${outputName}' has columns 0 and 1.`,
      `Set 'model.onnx.positive_class' to 0 or 1${labels ? `, or to one of the labels ${listed}` : ''}.`,
    )
  }
  return positiveClass
}

// ---- descriptions for messages ------------------------------------------------------------------

function describeShape(shape: ReadonlyArray<number | string>): string {
  return `[${shape.map((d) => (typeof d === 'number' && d < 0 ? '?' : String(d))).join(', ')}]`
}

function describeValues(values: readonly ValueMetadata[]): string {
  if (values.length === 0) return '(none)'
  return values.map((v) => (v.isTensor ? `${v.name} (${v.type} ${describeShape(v.shape)})` : `${v.name} (not a tensor)`)).join(', ')
}

function describeColumns(features: readonly FeatureInfo[]): string {
  if (features.length === 0) return '(none)'
  return features.map((f) => `${f.name} (${f.kind})`).join(', ')
}

/** parseOnnxTreeEnsemble, with any decoding trouble meaning "not readable" (onnxruntime has accepted the file). */
function readTrees(bytes: Uint8Array, task: Task, output: OutputPlan) {
  if (task === 'multiclass') return undefined
  try {
    return parseOnnxTreeEnsemble(bytes, { task, outputName: output.name, positiveColumn: output.positive })
  } catch {
    return undefined
  }
}

// ---- multiclass ---------------------------------------------------------------------------------
// Kept in functions of their own (the binary and regression paths above are untouched by them).

/** The [N, K] probability output of a multiclass model, and which of its columns is each data class. */
function planClassOutput(outputs: readonly ValueMetadata[], options: OnnxModelOptions, summary: OnnxSummary): OutputPlan {
  const { source } = options
  const classes = options.classes ?? []
  const k = classes.length
  if (k < 3) throw new RangeError(`loadOnnxModel needs the data's classes (at least 3) for a multiclass model, got ${k}`)
  const fix = `Export the classifier with an output holding the class probabilities as a float tensor [N, ${k}] (name it 'probabilities' if it has several float outputs).`
  const floats = outputs.filter(isFloatTensor)
  const declared = floats.filter((o) => o.shape.length === 2 && o.shape[1] === k)
  const output = floats.find((o) => o.name === 'probabilities') ?? (declared.length === 1 ? declared[0] : floats.length === 1 ? floats[0] : undefined)
  if (!output) {
    if (outputs.some((o) => !o.isTensor)) {
      throw outputError(
        `The ONNX model '${source}' returns its class probabilities as a sequence of maps, which plumbline cannot read.`,
        outputs,
        `Export the probabilities as a plain float tensor [N, ${k}] instead: leave out the final ZipMap step that turns them into maps (in skl2onnx, the converter option zipmap=False).`,
      )
    }
    throw outputError(`The ONNX model '${source}' has no float tensor output of class probabilities [N, ${k}].`, outputs, fix)
  }
  const declaredWidth = output.shape[1]
  if (output.shape.length !== 2 || (typeof declaredWidth === 'number' && declaredWidth >= 0 && declaredWidth !== k)) {
    throw outputError(
      `The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; the data has ${k} classes (${classes.join(', ')}), so the probabilities must be [N, ${k}].`,
      outputs,
      fix,
    )
  }
  const labels = summary.classLabelsByOutput.get(output.name) ?? (summary.classLabelSets.length === 1 ? summary.classLabelSets[0] : undefined)
  const columns = classColumns(classes, labels, source, output.name)
  return {
    name: output.name,
    width: k,
    columns,
    copy(value, start, end, out) {
      const tensor = value as Tensor
      const rows = end - start
      if (!(tensor.dims.length === 2 && tensor.dims[0] === rows && tensor.dims[1] === k)) {
        throw outputError(`The ONNX model '${source}' output '${output.name}' came back with shape [${tensor.dims.join(', ')}] for ${rows} rows; the probabilities must be [N, ${k}].`, outputs, fix)
      }
      const data = tensor.data as Float32Array | Float64Array
      const slack = probabilitySlack(data)
      for (let i = 0; i < rows; i++) {
        for (let c = 0; c < k; c++) out[(start + i) * k + c] = data[i * k + columns[c]]
      }
      checkClassRows(out.subarray(start * k, end * k), k, slack, source, start, `output '${output.name}'`)
    },
  }
}

/** Model column of each data class: by declared label (as text), else the same position. */
function classColumns(classes: readonly string[], labels: readonly (string | number)[] | undefined, source: string, outputName: string): number[] {
  if (!labels) return classes.map((_, c) => c)
  const columns = classes.map((label) => labels.findIndex((l) => String(l) === label))
  const missing = classes.filter((_, c) => columns[c] < 0)
  if (missing.length > 0 || labels.length !== classes.length) {
    throw new UserError(
      `The ONNX model '${source}' declares the classes ${labels.map((l) => `'${l}'`).join(', ')} for its output '${outputName}', but the data's classes are ${classes.map((l) => `'${l}'`).join(', ')}` +
        (missing.length > 0 ? ` (the model has no ${missing.map((l) => `'${l}'`).join(', ')}).` : '.'),
      'Train and export the model on the same class labels as the target column, written the same way.',
    )
  }
  return columns
}

/** Clamps float rounding just outside [0, 1] and refuses a value that is no probability or a row that does not sum to 1. */
function checkClassRows(values: Float64Array, k: number, slack: number, source: string, firstRow: number, what: string): void {
  for (let i = 0; i < values.length / k; i++) {
    let sum = 0
    for (let c = 0; c < k; c++) {
      const raw = values[i * k + c]
      const p = raw < 0 && raw >= -slack ? 0 : raw > 1 && raw <= 1 + slack ? 1 : raw
      if (!(p >= 0 && p <= 1)) {
        throw new UserError(
          `The ONNX model '${source}' ${what} is not a probability: row ${firstRow + i + 1} of the rows scored has ${raw} for class column ${c}.`,
          'Export the model with its probability step (a softmax post-transform), not raw scores.',
        )
      }
      values[i * k + c] = p
      sum += p
    }
    if (!(Math.abs(sum - 1) <= 1e-4)) {
      throw new UserError(
        `The ONNX model '${source}' ${what} does not give class probabilities: row ${firstRow + i + 1} of the rows scored sums to ${sum}, not 1.`,
        'Export the model with its probability step (a softmax post-transform), not raw or one-vs-rest scores.',
      )
    }
  }
}

/** The tree evaluator's multiclass output, held to the same rule as onnxruntime's. */
function asClassProbabilities(values: Float64Array, k: number, source: string): Float64Array {
  checkClassRows(values, k, 16 * 2 ** -23, source, 0, 'tree ensemble')
  return values
}

/** parseOnnxClassEnsembles, ordered as the data's classes; undefined when it cannot read the graph. */
function readClassTrees(bytes: Uint8Array, output: OutputPlan, featureNames: readonly string[]): ClassEnsembles | undefined {
  try {
    const parsed = parseOnnxClassEnsembles(bytes, { outputName: output.name, classCount: output.width ?? 0 })
    if (!parsed.ok || parsed.width > featureNames.length) return undefined
    return {
      classes: output.columns!.map((column) => ({ ...parsed.classes[column], featureNames })),
      link: parsed.postTransform === 'SOFTMAX' ? 'softmax' : 'none',
    }
  } catch {
    return undefined
  }
}
