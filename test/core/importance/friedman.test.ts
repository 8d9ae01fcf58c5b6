import { describe, expect, it } from 'vitest'
import type { Dataset } from '../../../src/core/data/dataset.ts'
import type { Metric } from '../../../src/core/metrics/metric.ts'
import { measureSide } from '../../../src/core/measure-side.ts'
import { createBuiltinFit } from '../../../src/core/models/builtin-fit.ts'
import { friedman1 } from '../models/gbt/friedman1.ts'
import { meanSquaredError } from './enumerate-permutation-draws.ts'
import { metricByName } from '../../../src/core/metrics/metric-by-name.ts'

function dataset(rows: number, seed: number): Dataset {
  const { matrix, y } = friedman1(rows, { seed, noiseSd: 1 })
  return { ...matrix, source: `friedman1(${rows}, seed ${seed})`, missing: matrix.features.map(() => 0), target: { name: 'y', values: y } }
}

// Friedman #1 (Friedman 1991, Annals of Statistics 19(1); as in scikit-learn's make_friedman1): population
// MSE increase when x_j of the TRUE function is replaced by an independent draw (derived; computed by
// numerical integration).
const population: Record<string, number> = { x1: 12.972748, x2: 12.972748, x3: 40 / 9, x4: 50 / 3, x5: 25 / 6 }

/** 5000 training rows, 2000 holdout rows, noise SD 1; 200 trees of depth 4; `refits` refits × 5 draws. */
function measureFriedman(metric: Metric, refits: number) {
  const train = dataset(5000, 1)
  const holdout = dataset(2000, 101)
  const fit = createBuiltinFit(train, 'regression', {
    learner: 'gradient-boosting',
    boosting: { trees: 200, maxDepth: 4, learningRate: 0.1, minRowsPerLeaf: 20, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 },
    maxBins: 255,
    linearL2: 1,
  })
  return measureSide(
    { side: 'head', train, holdout, reference: train, fit },
    { task: 'regression', metric, seed: 8, refits, draws: 5, groups: [], evaluationRows: 2000, referenceRows: 5000 },
  )
}

describe('measureSide on Friedman #1 with the built-in gradient-boosted trees', () => {
  it('finds x6..x10 indistinguishable from zero and orders x4 > x1 ≈ x2 > x3 ≈ x5 as the population values predict', async () => {
    // 5000 training rows, 2000 holdout rows, noise SD 1; 200 trees of depth 4; 5 refits × 5 draws.
    const side = await measureFriedman(meanSquaredError, 5)
    const unit = Object.fromEntries(side.importances.map((u) => [u.name, u]))
    expect(side.noiseCovers).toBe('refits-and-draws')
    expect(new Set(side.refitSeeds).size).toBe(5)
    // The model fits: holdout R² above 0.9 in every refit (the noise alone caps it near 0.96).
    for (const r2 of side.separation) expect(r2).toBeGreaterThan(0.9)

    // Uninformative features: indistinguishable from a practical zero of 0.01 (0.24% of x5's population
    // value, the smallest informative one): the mean is within ±0.01 and the 95% interval does not lie
    // above 0.01. `isAboveFloor` itself (lower bound above 0) is not asserted for them: the interval
    // covers refit and draw noise on one fixed holdout, not the sampling of the holdout rows, and a
    // model that leans on a noise column the same way in every refit keeps a small fixed ΔMSE on that
    // holdout. Measured over 12 pairs of data and gate seeds at these settings: 4 of 60 noise-feature
    // intervals lay above 0 and 8 below it (80% coverage, not 95%), largest |mean| 0.006.
    for (const name of ['x6', 'x7', 'x8', 'x9', 'x10']) {
      expect(Math.abs(unit[name].mean)).toBeLessThan(0.01)
      expect(unit[name].lower).toBeLessThan(0.01)
    }
    // Informative features: all above the floor, each within 15% of its population value. The tolerance
    // is a stated allowance for the fitted model (not the true function): at this size a fitted GBDT's
    // importances ran from 8% below to 3% above the population values over the seeds tried.
    for (const [name, value] of Object.entries(population)) {
      expect(unit[name].isAboveFloor).toBe(true)
      expect(Math.abs(unit[name].mean / value - 1)).toBeLessThanOrEqual(0.15)
    }
    // Order where the population values are more than 15% apart: the 95% intervals do not overlap.
    for (const [higher, lower] of [
      ['x4', 'x1'],
      ['x4', 'x2'],
      ['x1', 'x3'],
      ['x2', 'x3'],
      ['x1', 'x5'],
      ['x2', 'x5'],
    ]) {
      expect(unit[higher].lower, `${higher} above ${lower}`).toBeGreaterThan(unit[lower].upper)
    }
    // Ties within the tolerance: x1 and x2 are equal in the population; x3 and x5 are only 6.7% apart,
    // about two standard deviations of what 2000 holdout rows can resolve (the sampling SD of the
    // true function's ΔMSE for x5 is 25·sqrt(1/15 − 1/36)/sqrt(2000) = 0.11, derived), so their
    // order is not asserted, only that they agree within the tolerance.
    expect(Math.abs(unit.x1.mean - unit.x2.mean)).toBeLessThanOrEqual(0.15 * Math.max(unit.x1.mean, unit.x2.mean))
    expect(Math.abs(unit.x3.mean - unit.x5.mean)).toBeLessThanOrEqual(0.15 * Math.max(unit.x3.mean, unit.x5.mean))
  })

  it('with the RMSE metric, whose interval also covers holdout sampling, marks x6..x10 indistinguishable from zero', async () => {
    // The same data; RMSE is a mean over rows to first order, so the interval adds the holdout rows'
    // standard error (row-contributions.ts). Measured over 8 pairs of data and gate seeds at these
    // settings: 0 of 40 noise-feature intervals above zero, 40 of 40 informative ones above it.
    const side = await measureFriedman(metricByName('rmse', 'regression'), 3)
    for (const unit of side.importances) {
      expect(unit.isAboveFloor, unit.name).toBe(Number(unit.name.slice(1)) <= 5)
    }
  })
})
