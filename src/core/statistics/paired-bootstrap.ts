import type { Metric } from '../metrics/metric.ts'
import { createRandom, deriveSeed } from './random.ts'

/**
 * Paired bootstrap of a metric difference over rows (Efron & Tibshirani 1993, "An Introduction to
 * the Bootstrap", ch. 6; paired resampling as in Koehn 2004 for system comparisons): each replicate
 * resamples the holdout rows with replacement and computes metric(head) − metric(base) on the same
 * resampled rows, so the variation shared by both predictions cancels.
 * Predictions may hold several values per row (a multiclass model's K class probabilities, row-major
 * [n, K]); a resampled row takes all of its values.
 * Returns the replicates (their SD is the standard error of the difference). Cost O(B·n·metric).
 */
export function pairedBootstrap(
  y: Float64Array,
  basePrediction: Float64Array,
  headPrediction: Float64Array,
  options: { readonly metric: Metric; readonly replicates: number; readonly seed: number },
): number[] {
  const n = y.length
  const width = n === 0 ? 1 : basePrediction.length / n
  if (!Number.isInteger(width) || width < 1 || basePrediction.length !== n * width || headPrediction.length !== n * width) {
    throw new RangeError(`pairedBootstrap needs predictions for all ${n} rows, got ${basePrediction.length} and ${headPrediction.length}`)
  }
  const random = createRandom(deriveSeed(options.seed, 'paired-bootstrap'))
  const ys = new Float64Array(n)
  const bs = new Float64Array(n * width)
  const hs = new Float64Array(n * width)
  const out: number[] = []
  for (let b = 0; b < options.replicates; b++) {
    for (let i = 0; i < n; i++) {
      const k = random.int(n)
      ys[i] = y[k]
      if (width === 1) {
        bs[i] = basePrediction[k]
        hs[i] = headPrediction[k]
      } else {
        bs.set(basePrediction.subarray(k * width, (k + 1) * width), i * width)
        hs.set(headPrediction.subarray(k * width, (k + 1) * width), i * width)
      }
    }
    out.push(options.metric.compute(ys, hs) - options.metric.compute(ys, bs))
  }
  return out
}
