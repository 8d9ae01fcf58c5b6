import type { Dataset, Task } from '../data/dataset.ts'
import { createRandom, deriveSeed, shuffledIndices } from '../statistics/random.ts'
import { binFeatures, type BinnedFeatures } from './gbt/bin-features.ts'
import { fitBoosted, type BoostingSettings } from './gbt/fit-boosted.ts'
import { fitLogistic } from './linear/fit-logistic.ts'
import { fitRidge } from './linear/fit-ridge.ts'
import type { Fit, FitRequest, Model } from './model.ts'

export interface BuiltinLearnerSettings {
  readonly learner: 'gradient-boosting' | 'linear'
  readonly boosting: BoostingSettings
  readonly maxBins: number
  /** The linear learner's L2 penalty (the boosting settings carry their own). */
  readonly linearL2: number
}

/**
 * The built-in learners as a Fit: each request trains on the side's training rows in an order
 * shuffled by the request's seed, with the columns offered in a shuffled order, minus the columns
 * left out. So "retrain with another seed" changes row order, column order and the per-tree
 * subsamples, as a real retrain would. Bins are computed once per dataset and shared by every refit
 * (or passed in as `options.binned`, binFeatures of `train` with `settings.maxBins`, e.g. a matrix
 * in shared memory that worker threads read).
 */
export function createBuiltinFit(
  train: Dataset,
  task: Task,
  settings: BuiltinLearnerSettings,
  options: { readonly binned?: BinnedFeatures } = {},
): Fit {
  const target = train.target?.values
  if (!target) throw new RangeError('createBuiltinFit needs a training dataset with a target')
  let binned: BinnedFeatures | undefined
  const names = train.features.map((f) => f.name)
  const classCount = task === 'multiclass' ? train.target?.classes?.length : undefined
  if (task === 'multiclass' && !(classCount !== undefined && classCount >= 3)) {
    throw new RangeError('createBuiltinFit needs a multiclass target with its classes (K >= 3)')
  }
  return async (request: FitRequest): Promise<Model> => {
    const leaveOut = new Set(request.leaveOut)
    for (const name of leaveOut) {
      if (!names.includes(name)) throw new RangeError(`createBuiltinFit: cannot leave out unknown feature '${name}'`)
    }
    const rows = shuffledIndices(train.rows, createRandom(deriveSeed(request.seed, 'row-order')))
    const columnOrder = Array.from(shuffledIndices(names.length, createRandom(deriveSeed(request.seed, 'column-order'))))
    const excluded = names.flatMap((name, j) => (leaveOut.has(name) ? [j] : []))
    if (excluded.length === names.length) throw new RangeError('createBuiltinFit: every feature was left out')
    if (settings.learner === 'linear') {
      const features = columnOrder.filter((j) => !leaveOut.has(names[j]))
      const options = { l2: settings.linearL2, rows, features }
      if (task === 'multiclass') throw new RangeError('createBuiltinFit: the linear learner has no multiclass fit (the policy refuses it)')
      return task === 'binary' ? fitLogistic(train, target, options) : fitRidge(train, target, options)
    }
    // One binned matrix per side, shared by every refit; a left-out column is masked, not re-binned.
    binned ??= options.binned ?? binFeatures(train, { maxBins: settings.maxBins })
    return fitBoosted(binned, target, {
      task,
      settings: settings.boosting,
      seed: request.seed,
      rows,
      features: columnOrder,
      excludeFeatures: excluded,
      ...(classCount !== undefined ? { classCount } : {}),
    })
  }
}
