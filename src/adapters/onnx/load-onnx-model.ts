/**
 * Loads an ONNX model (from any framework that exports one) as a plumbline Model, run by
 * onnxruntime-node on the CPU. What is fed and read is planned first, from the session's declared
 * inputs and outputs and the file's metadata and class labels, by pure modules: planOnnxInputs
 * (src/core/models/plan-onnx-inputs.ts: one [N, F] matrix or one input per column, and the column
 * order) and planOnnxOutput (src/core/models/plan-onnx-output.ts: which output holds the prediction
 * or the class probabilities, and how [N], [N, 1], [N, 2] and [N, K] outputs are read and checked).
 * This adapter only opens the session, turns the planned values into tensors and runs it.
 *
 * predict runs the session over chunks of `batchRows` rows (default 65536), so the input and output
 * tensors stay bounded whatever the number of rows, and concatenates into one Float64Array (row-major
 * [N, K] for a multiclass model).
 *
 * Tree ensembles plumbline can read (readOnnxTrees: see parseOnnxTreeEnsemble and
 * parseOnnxClassEnsembles for the graphs) are evaluated by plumbline's own tree evaluator instead,
 * which also gives permutation importance its fast path; the Model's `engine` says which ran
 * ('plumbline-trees' or 'onnxruntime'). The first predict call compares the two on up to 2048 rows
 * and keeps onnxruntime for good if they differ by more than 1e-5 relative.
 */
import ort from 'onnxruntime-node'
import type { FeatureInfo, FeatureMatrix, Task } from '../../core/data/dataset.ts'
import { selectRows } from '../../core/data/dataset.ts'
import { UserError } from '../../core/errors.ts'
import type { Model, ModelEngine } from '../../core/models/model.ts'
import { FEATURES_METADATA_KEY } from '../../core/models/onnx-proto.ts'
import { onnxInputValues, planOnnxInputs } from '../../core/models/plan-onnx-inputs.ts'
import { outputWidth, planOnnxOutput, readOnnxOutput } from '../../core/models/plan-onnx-output.ts'
import { readOnnxSummary, type OnnxSummary } from '../../core/models/read-onnx-summary.ts'
import { createOnnxTreePredictor, readOnnxTrees, type OnnxTrees } from '../../core/models/read-onnx-trees.ts'

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
  /** The positive class: a declared label, or a probability column index (see planOnnxOutput). */
  readonly positiveClass?: string | number
  /** Rows per session run; default DEFAULT_BATCH_ROWS. */
  readonly batchRows?: number
  /** 'onnxruntime' keeps every prediction with onnxruntime even for a tree ensemble plumbline can read (default 'auto'). */
  readonly evaluator?: 'auto' | 'onnxruntime'
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
  const inputs = planOnnxInputs(session.inputMetadata, options, summary.metadata)
  const output = planOnnxOutput(session.outputMetadata, options, summary)
  const width = outputWidth(output)
  const { source } = options
  const featureNames = inputs.featureNames
  // A tree ensemble plumbline can read is evaluated by its own tree evaluator (exact routing, double
  // sums) and gets the permutation fast path; the first predict call checks it against onnxruntime
  // on up to CHECK_ROWS rows and falls back to onnxruntime for good on any disagreement.
  let trees: OnnxTrees | undefined = options.evaluator !== 'onnxruntime' ? readOnnxTrees(bytes, inputs, output) : undefined
  let checked = false
  let engine: ModelEngine = trees ? 'plumbline-trees' : 'onnxruntime'
  const evaluate = (matrix: FeatureMatrix, ensemble: OnnxTrees) => createOnnxTreePredictor(ensemble, matrix, output)?.predict(new Map(), 1)

  const runSession = async (matrix: FeatureMatrix): Promise<Float64Array> => {
    const out = new Float64Array(matrix.rows * width)
    for (let start = 0; start < matrix.rows; start += batchRows) {
      const end = Math.min(matrix.rows, start + batchRows)
      const feeds: Record<string, ort.Tensor> = {}
      for (const [name, value] of Object.entries(onnxInputValues(inputs, matrix, start, end, source))) {
        feeds[name] = new ort.Tensor(value.type, value.data, value.dims)
      }
      let result: ort.InferenceSession.ReturnType
      try {
        result = await session.run(feeds, [output.name])
      } catch (error) {
        throw new UserError(
          `The ONNX model '${source}' failed on rows ${start + 1} to ${end} of the data: ${error instanceof Error ? error.message : String(error)}`,
        )
      }
      const tensor = result[output.name] as ort.Tensor
      readOnnxOutput(output, { dims: tensor.dims, data: tensor.data as Float32Array | Float64Array }, start, end, out)
    }
    return out
  }

  return {
    kind: 'onnx',
    task: options.task,
    featureNames,
    ...(output.kind === 'multiclass' ? { classCount: width } : {}),
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
        // Trees whose output breaks the probability rule fall back too; onnxruntime's output is then held to it.
        let ours: Float64Array | undefined
        try {
          ours = evaluate(sample, trees)
        } catch {
          ours = undefined
        }
        const theirs = await runSession(sample)
        if (!ours || ours.some((p, i) => !(Math.abs(p - theirs[i]) <= AGREEMENT * Math.max(1, Math.abs(theirs[i]))))) {
          trees = undefined
          engine = 'onnxruntime'
        }
      }
      if (trees) return evaluate(matrix, trees)!
      return runSession(matrix)
    },
    createReplacementPredictor(base: FeatureMatrix) {
      return trees && checked ? createOnnxTreePredictor(trees, base, output) : undefined
    },
  }
}

/** Rows the tree evaluator is checked on against onnxruntime at the first prediction. */
const CHECK_ROWS = 2048
/** Largest difference allowed in that check, relative (onnxruntime's tree outputs are float32: ~6e-8). */
const AGREEMENT = 1e-5
