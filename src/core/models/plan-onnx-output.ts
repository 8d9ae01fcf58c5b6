/**
 * Which output of an ONNX model plumbline reads and how, decided from its declared outputs and
 * class labels before anything runs, and the reading of what a run returned (pure: the adapter
 * passes the returned tensor's dims and data).
 *
 * - regression: the single float tensor output, [N] or [N, 1].
 * - binary: a float tensor [N, 2] of class probabilities: the output named `probabilities`, else the
 *   only float output declared [N, 2], else the only float output. The positive column is
 *   `positiveClass` looked up among the labels the model declares (classlabels_strings /
 *   classlabels_int64s of the classifier node; a number is a label when the model declares integer
 *   labels, otherwise a column index 0 or 1); without `positiveClass`, the column whose declared label
 *   is 1 (or "1"), else column 1. A caller that knows the data's positive class should pass it.
 *   Probabilities outside [0, 1] are refused; NaN passes through.
 * - multiclass: a float tensor [N, K] of class probabilities (K = the data's classes, `classes`): the
 *   output named `probabilities`, else the only float output declared [N, K], else the only float
 *   output. Column k of the result is data class k: found by label among the labels the model
 *   declares (compared as text, so integer labels 0, 1, 2 match the classes '0', '1', '2'), or, for a
 *   model without labels, the model's column k (the classes in their sorted order, see
 *   Target.classes). Every value must lie in [0, 1] and every row sum to 1 within
 *   CLASS_SUM_TOLERANCE: raw or one-vs-rest scores are refused, naming the row and the class.
 * - Label outputs (an int64 or string [N] tensor beside the probabilities) are never read.
 *   Sequence-of-map outputs (ZipMap) are refused with a message on exporting plain tensors.
 */
import type { Task } from '../data/dataset.ts'
import { UserError } from '../errors.ts'
import type { OnnxSummary } from './read-onnx-summary.ts'
import { describeShape, describeValues, isColumnShape, isFloatTensor, type OnnxValueInfo } from './onnx-value-info.ts'

export type OnnxOutputPlan = { readonly name: string; readonly source: string; readonly declared: string } & (
  | { readonly kind: 'regression' }
  | { readonly kind: 'binary'; /** The probability column of the positive class. */ readonly positive: number }
  | {
      readonly kind: 'multiclass'
      /** The data's classes; the model's column of data class k is columns[k]. */
      readonly classes: readonly string[]
      readonly columns: readonly number[]
    }
)

export interface OnnxOutputOptions {
  readonly source: string
  readonly task: Task
  /** Multiclass: the data's class labels in order (Target.classes). */
  readonly classes?: readonly string[]
  /** Binary: the positive class, a declared label or a probability column index. */
  readonly positiveClass?: string | number
}

/** What a session run returned for the planned output. */
export interface ReturnedTensor {
  readonly dims: readonly number[]
  readonly data: Float32Array | Float64Array
}

/**
 * Largest distance from 1 of a row's class probabilities. float32 softmax over K classes, or a forest's
 * fractions summed over a few hundred trees in float32, is off by well under 1e-5; a model that returns
 * one-vs-rest sigmoids or raw scores is off by far more.
 */
export const CLASS_SUM_TOLERANCE = 1e-4

/** Values per row of the planned output: K for multiclass, else 1. */
export function outputWidth(plan: OnnxOutputPlan): number {
  return plan.kind === 'multiclass' ? plan.classes.length : 1
}

export function planOnnxOutput(outputs: readonly OnnxValueInfo[], options: OnnxOutputOptions, summary: Pick<OnnxSummary, 'classLabelsByOutput' | 'classLabelSets'>): OnnxOutputPlan {
  if (options.task === 'regression') return planRegressionOutput(outputs, options.source)
  if (options.task === 'multiclass') return planClassOutput(outputs, options, summary)
  return planProbabilityOutput(outputs, options, summary)
}

/** Copies rows start..end of a returned output into `out` (width values a row), checking its shape and, for a classifier, that the values are probabilities. */
export function readOnnxOutput(plan: OnnxOutputPlan, returned: ReturnedTensor, start: number, end: number, out: Float64Array): void {
  const rows = end - start
  const { dims, data } = returned
  if (plan.kind === 'regression') {
    if (!(dims[0] === rows && (dims.length === 1 || (dims.length === 2 && dims[1] === 1)))) {
      throw outputError(`The ONNX model '${plan.source}' output '${plan.name}' came back with shape [${dims.join(', ')}] for ${rows} rows; a regression output must be [N] or [N, 1].`, plan.declared, REGRESSION_FIX)
    }
    out.set(data, start)
    return
  }
  const k = plan.kind === 'binary' ? 2 : plan.classes.length
  if (!(dims.length === 2 && dims[0] === rows && dims[1] === k)) {
    const must = plan.kind === 'binary' ? `a binary model's probabilities must be [N, 2]` : `the probabilities must be [N, ${k}]`
    throw outputError(`The ONNX model '${plan.source}' output '${plan.name}' came back with shape [${dims.join(', ')}] for ${rows} rows; ${must}.`, plan.declared, classFix(k))
  }
  // Class fractions averaged over trees in float32 can land a few units in the last place beyond
  // [0, 1] (1.0000003576 is 1 + 3 float32 ulps); that is rounding, clamped. A real score is refused.
  const slack = probabilitySlack(data)
  if (plan.kind === 'binary') {
    for (let i = 0; i < rows; i++) {
      const raw = data[2 * i + plan.positive]
      const p = clampRounding(raw, slack)
      if (!(p >= 0 && p <= 1)) {
        throw new UserError(
          `The ONNX model '${plan.source}' output '${plan.name}' is not a probability: row ${start + i + 1} of the rows scored has ${p}.`,
          `Export the model with its probability step (a sigmoid or softmax post-transform), not raw scores.`,
        )
      }
      out[start + i] = p
    }
    return
  }
  for (let i = 0; i < rows; i++) {
    for (let c = 0; c < k; c++) out[(start + i) * k + c] = data[i * k + plan.columns[c]]
  }
  checkClassRows(out.subarray(start * k, end * k), plan, slack, start, `output '${plan.name}'`)
}

/**
 * The tree evaluator's output, held to the rule the onnxruntime path applies: leaf values are
 * float32 in the model, so a class fraction a few float32 units beyond [0, 1] is rounding, clamped;
 * anything further out is not a probability and is refused. Regression values pass as they are.
 */
export function checkTreeOutput(plan: OnnxOutputPlan, values: Float64Array): Float64Array {
  const slack = 16 * 2 ** -23
  if (plan.kind === 'multiclass') {
    checkClassRows(values, plan, slack, 0, 'tree ensemble')
    return values
  }
  if (plan.kind === 'regression') return values
  for (let i = 0; i < values.length; i++) {
    const raw = values[i]
    const p = clampRounding(raw, slack)
    if (!(p >= 0 && p <= 1)) {
      throw new UserError(
        `The ONNX model '${plan.source}' does not give probabilities: row ${i + 1} of the rows scored has ${raw}.`,
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

const REGRESSION_FIX = `Export the regressor with exactly one float output holding one prediction per row, [N] or [N, 1].`

function classFix(k: number): string {
  return `Export the classifier with an output holding the class probabilities as a float tensor [N, ${k}] (name it 'probabilities' if it has several float outputs).`
}

function clampRounding(raw: number, slack: number): number {
  return raw < 0 && raw >= -slack ? 0 : raw > 1 && raw <= 1 + slack ? 1 : raw
}

function outputError(problem: string, declared: string, fix: string): UserError {
  return new UserError(`${problem}\nModel outputs: ${declared}`, fix)
}

function planRegressionOutput(outputs: readonly OnnxValueInfo[], source: string): OnnxOutputPlan {
  const declared = describeValues(outputs)
  const floats = outputs.filter(isFloatTensor)
  if (floats.length !== 1) {
    throw outputError(`The ONNX model '${source}' has ${floats.length} float tensor outputs; a regression model needs exactly one.`, declared, REGRESSION_FIX)
  }
  const output = floats[0]
  if (!(output.shape.length === 0 || isColumnShape(output.shape))) {
    throw outputError(`The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; a regression output must be [N] or [N, 1].`, declared, REGRESSION_FIX)
  }
  return { kind: 'regression', name: output.name, source, declared }
}

/** The output holding the class probabilities of a K-class model (see the module comment), or a UserError. */
function findProbabilities(outputs: readonly OnnxValueInfo[], k: number, source: string, declared: string) {
  const floats = outputs.filter(isFloatTensor)
  const declaredK = floats.filter((o) => o.shape.length === 2 && o.shape[1] === k)
  const output = floats.find((o) => o.name === 'probabilities') ?? (declaredK.length === 1 ? declaredK[0] : floats.length === 1 ? floats[0] : undefined)
  if (!output) {
    const maps = outputs.filter((o) => !o.isTensor)
    if (maps.length > 0) {
      throw outputError(
        `The ONNX model '${source}' returns its class probabilities as a sequence of maps (output '${maps[0].name}'), which plumbline cannot read.`,
        declared,
        `Export the probabilities as a plain float tensor [N, ${k}] instead: leave out the final ZipMap step that turns them into maps (in skl2onnx, the converter option zipmap=False).`,
      )
    }
    throw outputError(`The ONNX model '${source}' has no float tensor output of class probabilities [N, ${k}].`, declared, classFix(k))
  }
  return output
}

function planProbabilityOutput(outputs: readonly OnnxValueInfo[], options: OnnxOutputOptions, summary: Pick<OnnxSummary, 'classLabelsByOutput' | 'classLabelSets'>): OnnxOutputPlan {
  const { source } = options
  const declared = describeValues(outputs)
  const output = findProbabilities(outputs, 2, source, declared)
  const width = output.shape[1]
  if (output.shape.length !== 2 || (typeof width === 'number' && width >= 0 && width !== 2)) {
    throw outputError(`The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; a binary model's probabilities must be [N, 2].`, declared, classFix(2))
  }
  const labels = summary.classLabelsByOutput.get(output.name) ?? (summary.classLabelSets.length === 1 ? summary.classLabelSets[0] : undefined)
  return { kind: 'binary', name: output.name, source, declared, positive: positiveColumn(options.positiveClass, labels, source, output.name) }
}

function planClassOutput(outputs: readonly OnnxValueInfo[], options: OnnxOutputOptions, summary: Pick<OnnxSummary, 'classLabelsByOutput' | 'classLabelSets'>): OnnxOutputPlan {
  const { source } = options
  const classes = options.classes ?? []
  const k = classes.length
  if (k < 3) throw new RangeError(`planOnnxOutput needs the data's classes (at least 3) for a multiclass model, got ${k}`)
  const declared = describeValues(outputs)
  const output = findProbabilities(outputs, k, source, declared)
  const declaredWidth = output.shape[1]
  if (output.shape.length !== 2 || (typeof declaredWidth === 'number' && declaredWidth >= 0 && declaredWidth !== k)) {
    throw outputError(
      `The ONNX model '${source}' output '${output.name}' has shape ${describeShape(output.shape)}; the data has ${k} classes (${classes.join(', ')}), so the probabilities must be [N, ${k}].`,
      declared,
      classFix(k),
    )
  }
  const labels = summary.classLabelsByOutput.get(output.name) ?? (summary.classLabelSets.length === 1 ? summary.classLabelSets[0] : undefined)
  return { kind: 'multiclass', name: output.name, source, declared, classes, columns: classColumns(classes, labels, source, output.name) }
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

/** Clamps float rounding just outside [0, 1] and refuses a value that is no probability or a row that does not sum to 1, naming the row and the class. */
function checkClassRows(values: Float64Array, plan: Extract<OnnxOutputPlan, { kind: 'multiclass' }>, slack: number, firstRow: number, what: string): void {
  const k = plan.classes.length
  for (let i = 0; i < values.length / k; i++) {
    let sum = 0
    for (let c = 0; c < k; c++) {
      const raw = values[i * k + c]
      const p = clampRounding(raw, slack)
      if (!(p >= 0 && p <= 1)) {
        throw new UserError(
          `The ONNX model '${plan.source}' ${what} is not a probability: row ${firstRow + i + 1} of the rows scored has ${raw} for the class '${plan.classes[c]}' (column ${plan.columns[c]} of the model's ${k}).`,
          'Export the model with its probability step (a softmax post-transform), not raw scores.',
        )
      }
      values[i * k + c] = p
      sum += p
    }
    if (!(Math.abs(sum - 1) <= CLASS_SUM_TOLERANCE)) {
      throw new UserError(
        `The ONNX model '${plan.source}' ${what} does not give class probabilities: row ${firstRow + i + 1} of the rows scored sums to ${sum}, not 1 (within ${CLASS_SUM_TOLERANCE}) over its ${k} class columns.`,
        'Export the model with its probability step (a softmax post-transform), not raw or one-vs-rest scores.',
      )
    }
  }
}
