import type { FeatureMatrix, Task } from '../data/dataset.ts'

/**
 * A fitted model. One batched call over a whole matrix; the result is the regression value, or for
 * a binary task the positive-class probability, one per row; for a multiclass task the K class
 * probabilities of each row, row-major [N, K] (row i's class k at i·K + k, classes in the target's
 * order, Target.classes), with `classCount` = K. Async because ONNX sessions are.
 * The matrix's features must be exactly `featureNames`, in that order (use selectFeatures).
 */
export interface Model {
  readonly kind: string
  readonly task: Task
  readonly featureNames: readonly string[]
  /** Multiclass only: K, the width of each row's prediction. Absent: one value per row. */
  readonly classCount?: number
  /**
   * What computes the predictions: plumbline's own tree evaluator (built-in boosted trees, and ONNX
   * tree ensembles it could read), its linear evaluator, or onnxruntime. Read it after the first
   * predict call: a loaded model may fall back to onnxruntime then.
   */
  readonly engine?: ModelEngine
  predict(matrix: FeatureMatrix): Promise<Float64Array>
  /**
   * Optional fast path for permutation importance: predictions for `base`'s rows with some columns
   * replaced, computed without re-running what the replacement cannot change; undefined when this
   * model has none for these rows.
   */
  createReplacementPredictor?(base: FeatureMatrix): ReplacementPredictor | undefined
  /** Built-in learners: gain and split count per feature (impurity importance, in-sample). */
  readonly splitStatistics?: readonly { feature: string; gain: number; splits: number }[]
}

export type ModelEngine = 'plumbline-trees' | 'plumbline-linear' | 'onnxruntime'

/** What one refit is asked for. The seed is already derived; leaveOut is for drop-column refits. */
export interface FitRequest {
  readonly side: 'base' | 'head'
  readonly seed: number
  /** 0-based refit number within the side. */
  readonly refit: number
  /** Features to leave out of the fit (drop-column importance); empty for an ordinary refit. */
  readonly leaveOut: readonly string[]
}

/** Trains a model for one side. Built-in learners and the repository's training command both fit this. */
export type Fit = (request: FitRequest) => Promise<Model>

/** Predicts a fixed set of rows with some columns replaced (see Model.createReplacementPredictor). */
export interface ReplacementPredictor {
  readonly rows: number
  /**
   * `replaced` maps a feature name to `draws` stacked copies of its column (draws · rows values,
   * copy k at offset k · rows). Returns draws · rows predictions in the same layout.
   */
  predict(replaced: ReadonlyMap<string, Float64Array>, draws: number): Float64Array
  /** predict for several replacements in one pass (one per unit, e.g. every feature of a model). */
  predictMany?(units: readonly ReadonlyMap<string, Float64Array>[], draws: number): Float64Array[]
}

/** How many values `predict` returns per row: K for a multiclass model, else 1. */
export function predictionWidth(model: Pick<Model, 'classCount'>): number {
  return model.classCount ?? 1
}
