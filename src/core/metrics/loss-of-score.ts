import type { MetricName } from './metric.ts'

/**
 * A holdout score as a loss that is zero for a perfect model and grows as the model gets worse, so
 * that "the share of the remaining loss" means the same for every metric: log-loss, Brier and MAE
 * are losses already; RMSE is squared (mean squared error, so shares are shares of residual
 * variance); AUC, accuracy and R² become 1 − score. Undefined scores stay NaN.
 */
export function lossOfScore(metric: MetricName, score: number): number {
  switch (metric) {
    case 'log-loss':
    case 'brier':
    case 'mae':
      return score
    case 'rmse':
      return score * score
    case 'auc':
    case 'accuracy':
    case 'r2':
      return 1 - score
  }
}
