import type { Dataset, Task } from './data/dataset.ts'
import { selectFeatures } from './data/dataset.ts'
import { rocAuc } from './metrics/roc-auc.ts'
import { rSquared } from './metrics/r-squared.ts'
import type { Fit } from './models/model.ts'
import { deriveSeed } from './statistics/random.ts'

/**
 * How well each named feature alone separates the holdout: a built-in model trained on that one
 * column, scored by holdout AUC (binary) or R² (regression). This is a property of the data, not of
 * the gated model, so it is computed the same way for built-in, ONNX and externally trained models.
 * Cost: one single-column fit per name (about 1/F of a full fit each).
 */
export async function singleFeatureSeparation(
  train: Dataset,
  holdout: Dataset,
  names: readonly string[],
  options: { readonly fit: Fit; readonly task: Task; readonly seed: number; readonly side: 'base' | 'head' },
): Promise<Record<string, number>> {
  const all = train.features.map((f) => f.name)
  const y = holdout.target!.values
  const result: Record<string, number> = {}
  for (const name of names) {
    if (!all.includes(name)) continue
    const model = await options.fit({
      side: options.side,
      seed: deriveSeed(options.seed, 'single-feature', name),
      refit: 0,
      leaveOut: all.filter((other) => other !== name),
    })
    const prediction = await model.predict(selectFeatures(holdout, model.featureNames))
    result[name] = options.task === 'binary' ? rocAuc(y, prediction) : rSquared(y, prediction)
  }
  return result
}
