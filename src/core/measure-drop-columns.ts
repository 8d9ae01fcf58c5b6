import type { Dataset } from './data/dataset.ts'
import { selectFeatures } from './data/dataset.ts'
import type { Metric } from './metrics/metric.ts'
import type { Fit } from './models/model.ts'

/** Which features a side refits without: every one in `also` it has, plus its top `top` by permutation importance. */
export interface DropColumnRequest {
  readonly top: number
  readonly also: readonly string[]
}

/** One feature's drop-column refits: the holdout score of refit r fitted without it, seed for seed the full refit's. */
export interface DropColumnScores {
  readonly name: string
  readonly scores: readonly number[]
}

/**
 * The features a side refits without, in order: every one in `request.also` it has, then its top
 * `request.top` of `ranked` (highest permutation importance first); none with fewer than 2 features.
 */
export function dropColumnNames(train: Pick<Dataset, 'features'>, request: DropColumnRequest, ranked: readonly string[]): string[] {
  const present = new Set(train.features.map((f) => f.name))
  if (present.size < 2) return []
  return [...new Set([...request.also.filter((n) => present.has(n)), ...ranked.slice(0, request.top)])]
}

/**
 * Drop-column refits (LOCO) of one side: for each chosen feature and each refit seed, the side's own
 * Fit with `leaveOut: [feature]` and the same derived seed as the full refit, so that refit r with
 * and without the feature form a matched pair; scored with the policy metric on the whole holdout.
 * A fit that waits on something else (a training command) is asked for every refit at once.
 * `ranked` is the side's features by permutation importance, highest first.
 */
export async function measureDropColumns(
  inputs: {
    readonly side: 'base' | 'head'
    readonly train: Dataset
    readonly holdout: Dataset
    readonly fit: Fit
    /**
     * The holdout score of refit r fitted without `name`, computed elsewhere (a worker of the refit
     * pool) with the same pure code; when given, every pair is asked for at once.
     */
    readonly scoreWithout?: (name: string, refit: number) => Promise<number>
  },
  options: {
    readonly request: DropColumnRequest
    readonly ranked: readonly string[]
    readonly refitSeeds: readonly number[]
    readonly metric: Metric
    readonly concurrentFits?: boolean
  },
): Promise<DropColumnScores[]> {
  const names = dropColumnNames(inputs.train, options.request, options.ranked)
  if (names.length === 0) return []
  const target = inputs.holdout.target
  if (!target) throw new RangeError('measureDropColumns needs a holdout with a target')
  if (inputs.scoreWithout) {
    const scoreWithout = inputs.scoreWithout
    return Promise.all(names.map(async (name) => ({ name, scores: await Promise.all(options.refitSeeds.map((_, r) => scoreWithout(name, r))) })))
  }
  const fitOne = (name: string, r: number) => inputs.fit({ side: inputs.side, seed: options.refitSeeds[r], refit: r, leaveOut: [name] })
  const prefetched = options.concurrentFits ? names.map((name) => options.refitSeeds.map((_, r) => fitOne(name, r))) : undefined
  prefetched?.flat().forEach((p) => p.catch(() => undefined))
  const results: DropColumnScores[] = []
  for (const [i, name] of names.entries()) {
    const scores: number[] = []
    for (let r = 0; r < options.refitSeeds.length; r++) {
      const model = await (prefetched ? prefetched[i][r] : fitOne(name, r))
      const prediction = await model.predict(selectFeatures(inputs.holdout, model.featureNames))
      scores.push(options.metric.compute(target.values, prediction))
    }
    results.push({ name, scores })
  }
  return results
}
