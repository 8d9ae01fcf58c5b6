import type { Metric } from '../metrics/metric.ts'
import { argmaxRow } from '../metrics/multiclass-accuracy.ts'
import { rowLogLoss } from '../metrics/multiclass-log-loss.ts'

const EPSILON = 1e-15

/**
 * Per-row contributions to an importance: d_i with importance ≈ mean(d_i), so that the spread of
 * d over the holdout rows gives the holdout-sampling standard error of the importance (the finite
 * holdout is itself a sample; Williamson et al. 2021, "A general framework for inference on
 * algorithm-agnostic variable importance", JASA, treat importance as an estimate with such an SE).
 *
 * Exact for metrics that are means over rows (log-loss with scikit-learn's 1e-15 clipping, Brier,
 * accuracy, MAE); for RMSE and R² the first-order (delta-method) terms: ΔRMSE ≈ ΔMSE / (2·RMSE) and
 * ΔR² = −ΔMSE / Var_n(y). AUC is not a mean over rows: returns null, and the interval then covers
 * refit and draw noise only. Multiclass (predictions [n, K] row-major): log-loss and accuracy of the
 * most probable class, exact; macro one-vs-rest AUC returns null. Written into `out`; cost O(n·K).
 */
export function rowContributions(
  metric: Metric,
  y: ArrayLike<number>,
  base: ArrayLike<number>,
  permuted: ArrayLike<number>,
  out: Float64Array,
): Float64Array | null {
  const n = y.length
  if (metric.task === 'multiclass') return multiclassContributions(metric, y, base, permuted, out)
  switch (metric.name) {
    case 'log-loss': {
      const loss = (t: number, p: number) => {
        const q = Math.min(Math.max(p, EPSILON), 1 - EPSILON)
        return -(t * Math.log(q) + (1 - t) * Math.log(1 - q))
      }
      for (let i = 0; i < n; i++) out[i] = loss(y[i], permuted[i]) - loss(y[i], base[i])
      return out
    }
    case 'brier':
      for (let i = 0; i < n; i++) out[i] = (permuted[i] - y[i]) ** 2 - (base[i] - y[i]) ** 2
      return out
    case 'accuracy':
      for (let i = 0; i < n; i++) out[i] = Number((base[i] > 0.5) === (y[i] === 1)) - Number((permuted[i] > 0.5) === (y[i] === 1))
      return out
    case 'mae':
      for (let i = 0; i < n; i++) out[i] = Math.abs(permuted[i] - y[i]) - Math.abs(base[i] - y[i])
      return out
    case 'rmse':
    case 'r2': {
      let mse = 0
      let mean = 0
      for (let i = 0; i < n; i++) {
        mse += (base[i] - y[i]) ** 2
        mean += y[i]
      }
      mse /= n
      mean /= n
      let variance = 0
      for (let i = 0; i < n; i++) variance += (y[i] - mean) ** 2
      variance /= n
      const scale = metric.name === 'rmse' ? 1 / (2 * Math.sqrt(mse)) : 1 / variance
      if (!Number.isFinite(scale)) return null
      for (let i = 0; i < n; i++) out[i] = ((permuted[i] - y[i]) ** 2 - (base[i] - y[i]) ** 2) * scale
      return out
    }
    default:
      return null
  }
}

function multiclassContributions(metric: Metric, y: ArrayLike<number>, base: ArrayLike<number>, permuted: ArrayLike<number>, out: Float64Array): Float64Array | null {
  const n = y.length
  const k = n === 0 ? 0 : base.length / n
  switch (metric.name) {
    case 'log-loss':
      for (let i = 0; i < n; i++) out[i] = rowLogLoss(y[i], permuted, i * k, k, i) - rowLogLoss(y[i], base, i * k, k, i)
      return out
    case 'accuracy':
      for (let i = 0; i < n; i++) out[i] = Number(argmaxRow(base, i * k, k) === y[i]) - Number(argmaxRow(permuted, i * k, k) === y[i])
      return out
    default:
      return null
  }
}
