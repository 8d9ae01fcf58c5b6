import { describe, expect, it } from 'vitest'
import type { MetricName } from '../../../src/core/metrics/metric.ts'
import { defaultMetric, metricByName } from '../../../src/core/metrics/metric-by-name.ts'
import { userErrorText } from '../data/user-error-text.ts'
import { binaryP, binaryY, regressionPrediction, regressionY } from './examples.ts'

describe('metricByName(name, task)', () => {
  it('returns the metrics with the direction of improvement set', () => {
    const binary = (['auc', 'log-loss', 'accuracy', 'brier'] as const).map((name) => metricByName(name, 'binary'))
    expect(binary.map((m) => [m.name, m.task, m.higherIsBetter])).toEqual([
      ['auc', 'binary', true],
      ['log-loss', 'binary', false],
      ['accuracy', 'binary', true],
      ['brier', 'binary', false],
    ])
    const regression = (['rmse', 'mae', 'r2'] as const).map((name) => metricByName(name, 'regression'))
    expect(regression.map((m) => [m.name, m.task, m.higherIsBetter])).toEqual([
      ['rmse', 'regression', false],
      ['mae', 'regression', false],
      ['r2', 'regression', true],
    ])
  })

  it('computes what the named function computes', () => {
    // Reference values computed with scikit-learn 1.2.1 (see the per-metric tests).
    expect(metricByName('auc', 'binary').compute(binaryY, binaryP)).toBeCloseTo(0.875, 12)
    expect(metricByName('accuracy', 'binary').compute(binaryY, binaryP)).toBeCloseTo(0.75, 12)
    expect(metricByName('r2', 'regression').compute(regressionY, regressionPrediction)).toBeCloseTo(0.9347084481571464, 12)
  })

  it('refuses a metric that does not fit the task, or does not exist, listing the allowed ones', () => {
    expect(userErrorText(() => metricByName('rmse', 'binary'))).toBe(
      "The metric 'rmse' does not fit a binary target; the metrics for a binary target are auc, log-loss, accuracy, brier. | Choose one of those, or leave the metric out to use log-loss.",
    )
    expect(userErrorText(() => metricByName('auc', 'regression'))).toBe(
      "The metric 'auc' does not fit a regression target; the metrics for a regression target are rmse, mae, r2. | Choose one of those, or leave the metric out to use rmse.",
    )
    expect(userErrorText(() => metricByName('f1' as MetricName, 'binary'))).toBe(
      "There is no metric 'f1' for a binary target; the metrics for a binary target are auc, log-loss, accuracy, brier. | Choose one of those, or leave the metric out to use log-loss.",
    )
  })
})

describe('defaultMetric(task)', () => {
  it('is log-loss for binary and rmse for regression', () => {
    expect(defaultMetric('binary')).toBe('log-loss')
    expect(defaultMetric('regression')).toBe('rmse')
  })
})
