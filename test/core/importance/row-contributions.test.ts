import { describe, expect, it } from 'vitest'
import { rowContributions } from '../../../src/core/importance/row-contributions.ts'
import { metricByName } from '../../../src/core/metrics/metric-by-name.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

function sample(n: number, binary: boolean) {
  const random = createRandom(4)
  const y = Float64Array.from({ length: n }, () => (binary ? (random.next() < 0.4 ? 1 : 0) : random.normal()))
  const base = Float64Array.from(y, (v) => (binary ? Math.min(0.95, Math.max(0.05, 0.3 + 0.4 * v + 0.1 * random.normal())) : v + 0.3 * random.normal()))
  const permuted = Float64Array.from(base, (v) => (binary ? Math.min(0.99, Math.max(0.01, v + 0.2 * random.normal())) : v + 0.5 * random.normal()))
  return { y, base, permuted }
}

describe('rowContributions(metric, y, base, permuted, out)', () => {
  // For metrics that are means over rows the contributions average to the importance exactly (by
  // definition of the mean); for RMSE the delta method ΔRMSE ≈ ΔMSE / (2·RMSE) is first order.
  for (const name of ['log-loss', 'brier', 'accuracy'] as const) {
    it(`averages to the ${name} importance exactly`, () => {
      const metric = metricByName(name, 'binary')
      const { y, base, permuted } = sample(500, true)
      const d = rowContributions(metric, y, base, permuted, new Float64Array(500))!
      const importance = metric.higherIsBetter ? metric.compute(y, base) - metric.compute(y, permuted) : metric.compute(y, permuted) - metric.compute(y, base)
      expect(d.reduce((s, v) => s + v, 0) / 500).toBeCloseTo(importance, 12)
    })
  }
  for (const name of ['mae', 'r2'] as const) {
    it(`averages to the ${name} importance exactly`, () => {
      const metric = metricByName(name, 'regression')
      const { y, base, permuted } = sample(500, false)
      const d = rowContributions(metric, y, base, permuted, new Float64Array(500))!
      const importance = metric.higherIsBetter ? metric.compute(y, base) - metric.compute(y, permuted) : metric.compute(y, permuted) - metric.compute(y, base)
      expect(d.reduce((s, v) => s + v, 0) / 500).toBeCloseTo(importance, 12)
    })
  }
  it('gives the first-order RMSE change, within the second-order term', () => {
    const metric = metricByName('rmse', 'regression')
    const { y, base, permuted } = sample(500, false)
    const d = rowContributions(metric, y, base, permuted, new Float64Array(500))!
    const exact = metric.compute(y, permuted) - metric.compute(y, base)
    const approx = d.reduce((s, v) => s + v, 0) / 500
    // sqrt(a + h) − sqrt(a) = h / (2 sqrt(a)) − h² / (8 a^1.5) + …: the gap is about the second term.
    const mse = metric.compute(y, base) ** 2
    const h = approx * 2 * Math.sqrt(mse)
    expect(Math.abs(approx - exact)).toBeLessThan((1.5 * h * h) / (8 * mse ** 1.5))
  })
  it('returns null for AUC, which is not a mean over rows', () => {
    const { y, base, permuted } = sample(50, true)
    expect(rowContributions(metricByName('auc', 'binary'), y, base, permuted, new Float64Array(50))).toBeNull()
  })
})
