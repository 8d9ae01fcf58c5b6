import type { FeatureMatrix } from '../../data/dataset.ts'
import type { ReplacementPredictor } from '../model.ts'
import { createTreeReplacementPredictor, type EvaluableEnsemble } from './replacement-predictor.ts'

/**
 * A multiclass tree model as K per-class ensembles (one score per row each) and how the scores
 * become probabilities: 'softmax' over the K scores of a row, or 'none' (the scores are the
 * probabilities already, as a forest's averaged class fractions are).
 */
export interface ClassEnsembles {
  readonly classes: readonly EvaluableEnsemble[]
  readonly link: 'softmax' | 'none'
}

/**
 * The replacement fast path for a multiclass tree model: each class's ensemble gets
 * createTreeReplacementPredictor's exact re-walk of only the paths a replacement can change, then each
 * row's K scores are combined. Predictions are row-major [rows, K] (draw d's row i, class k at
 * (d · rows + i) · K + k). Returns undefined when a class's ensemble has no fast path.
 * Cost: K times the one-score fast path, plus O(draws · rows · K) for the softmax.
 */
export function createClassEnsemblesPredictor(model: ClassEnsembles, base: FeatureMatrix): ReplacementPredictor | undefined {
  const predictors = model.classes.map((ensemble) => createTreeReplacementPredictor(ensemble, base))
  if (predictors.some((p) => p === undefined)) return undefined
  const perClass = predictors as ReplacementPredictor[]
  const rows = base.rows
  const combine = (scores: readonly Float64Array[]) => combineClassScores(scores, model.link)
  return {
    rows,
    predict: (replaced, draws) => combine(perClass.map((p) => p.predict(replaced, draws))),
    predictMany: (units, draws) => {
      const byClass = perClass.map((p) => (p.predictMany ? p.predictMany(units, draws) : units.map((u) => p.predict(u, draws))))
      return units.map((_, u) => combine(byClass.map((outputs) => outputs[u])))
    },
  }
}

/** Row-major [n, K] probabilities from K score columns: softmax of each row (largest score first subtracted), or the scores as they are. */
export function combineClassScores(scores: readonly Float64Array[], link: 'softmax' | 'none'): Float64Array {
  const k = scores.length
  const n = k === 0 ? 0 : scores[0].length
  const out = new Float64Array(n * k)
  for (let i = 0; i < n; i++) {
    if (link === 'none') {
      for (let c = 0; c < k; c++) out[i * k + c] = scores[c][i]
      continue
    }
    let max = -Infinity
    for (let c = 0; c < k; c++) max = Math.max(max, scores[c][i])
    let total = 0
    for (let c = 0; c < k; c++) {
      const e = Math.exp(scores[c][i] - max)
      out[i * k + c] = e
      total += e
    }
    for (let c = 0; c < k; c++) out[i * k + c] /= total
  }
  return out
}
