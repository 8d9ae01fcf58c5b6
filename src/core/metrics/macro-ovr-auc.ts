import { checkClassMatrix } from './check-paired.ts'
import { rocAuc } from './roc-auc.ts'

/**
 * Macro one-vs-rest AUC of an [N, K] probability matrix: the unweighted mean over classes k of the
 * ROC AUC of column k against [y = k] (Provost & Domingos 2000, as scikit-learn 1.2.1's
 * roc_auc_score(y, P, multi_class='ovr', average='macro') computes it). `perClass` gives each
 * class's own AUC. `probabilities` is row-major (row i's class k at i·K + k).
 * Cost O(K·N log N). NaN when a class has no rows or every row is of one class (scikit-learn
 * raises there), for no rows, or for a NaN probability.
 */
export function macroOvrAuc(y: ArrayLike<number>, probabilities: ArrayLike<number>): number {
  const aucs = oneVsRestAucs(y, probabilities)
  if (aucs.length === 0) return NaN
  let sum = 0
  for (const a of aucs) sum += a
  return sum / aucs.length
}

/** Each class's one-vs-rest AUC (column k against [y = k]), in class order; [] for no rows. */
export function oneVsRestAucs(y: ArrayLike<number>, probabilities: ArrayLike<number>): number[] {
  const k = checkClassMatrix('macroOvrAuc', y, probabilities)
  const n = y.length
  const aucs: number[] = []
  const isClass = new Float64Array(n)
  const column = new Float64Array(n)
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < n; i++) {
      isClass[i] = y[i] === c ? 1 : 0
      column[i] = probabilities[i * k + c]
    }
    aucs.push(rocAuc(isClass, column))
  }
  return aucs
}
