import type { Dataset, Task } from '../data/dataset.ts'
import { selectFeatures } from '../data/dataset.ts'
import { oneVsRestAucs } from '../metrics/macro-ovr-auc.ts'
import { rocAuc } from '../metrics/roc-auc.ts'
import { rSquared } from '../metrics/r-squared.ts'
import { predictionWidth, type Fit } from '../models/model.ts'
import { predictionRows } from '../models/prediction-rows.ts'
import { deriveSeed } from '../statistics/random.ts'

/** The best slice of one feature's one-feature model. */
export interface SliceSeparation {
  /** The categorical column that defines the slice, and its value. */
  readonly column: string
  readonly value: string
  readonly rows: number
  readonly separation: number
  /** Multiclass: the class whose one-vs-rest AUC this is. */
  readonly bestClass?: string
  /** Set when the better model there saw the slicing column beside the feature (see withSliceColumn). */
  readonly besideColumn?: boolean
}

export interface SeparationResult {
  /** AUC (binary), the best class's one-vs-rest AUC (multiclass) or R² (regression) on the whole holdout, per feature. */
  readonly overall: Record<string, number>
  /** Multiclass only: per feature, the class whose one-vs-rest AUC `overall` is. */
  readonly bestClass?: Record<string, string>
  /** Per feature, its best slice (highest separation among slices large enough to judge). */
  readonly bestSlice: Record<string, SliceSeparation>
}

export interface SliceOptions {
  /** Categorical columns with at most this many values define slices. */
  readonly maxLevels: number
  /** A slice is judged only with at least this many holdout rows (binary: of each class). */
  readonly minRows: number
}

/**
 * How well each named feature alone separates the holdout: a built-in model trained on that one
 * column, scored by holdout AUC (binary) or R² (regression). Multiclass: the one-feature model's
 * probability of each class against the rest, one AUC per class, and the largest of them with the
 * class it belongs to (a feature that gives away one class is a leak of that class even when it
 * says nothing of the others). This is a property of the data, not of
 * the gated model, so it is computed the same way for built-in, ONNX and externally trained models.
 *
 * The same predictions are also scored within slices: every value of every categorical feature with
 * at most `maxLevels` values, when the slice has at least `minRows` holdout rows (binary: of each
 * class). A leak confined to one slice (one depot's system writes the outcome into a field) is
 * diluted on the whole holdout but shows as near-perfect separation inside its slice. A one-column
 * model fitted on every slice mixes them, though: where a feature tells the outcome in one slice and
 * nothing elsewhere, its predictions inside that slice are pulled toward the other slices' mean,
 * which AUC forgives (it reads only the order) and R² does not. So each feature in
 * `withSliceColumn` (what the pull request added or changed) is also fitted beside each slicing
 * column alone, a two-column model that can split on the slice first, and scored inside that
 * column's slices; the slice's value is the better of the two models there.
 * Cost: one single-column fit per name (about 1/F of a full fit each), one two-column fit per
 * added or changed name and slicing column, plus one score per slice.
 */
export async function singleFeatureSeparation(
  train: Dataset,
  holdout: Dataset,
  names: readonly string[],
  options: {
    readonly fit: Fit
    readonly task: Task
    readonly seed: number
    readonly side: 'base' | 'head'
    readonly slices?: SliceOptions
    /**
     * Features the pull request added or changed: each is also fitted beside each slicing column,
     * so its power inside a slice is that of a model allowed to treat the slice apart.
     */
    readonly withSliceColumn?: readonly string[]
  },
): Promise<SeparationResult> {
  const all = train.features.map((f) => f.name)
  const y = holdout.target!.values
  const classes = holdout.target!.classes ?? []
  const multiclass = options.task === 'multiclass'
  /** The score, and for a multiclass task the class it belongs to (the best one-vs-rest AUC; NaN when one is undefined). */
  const scoreOf = (target: ArrayLike<number>, prediction: ArrayLike<number>): { value: number; bestClass?: string } => {
    if (!multiclass) return { value: options.task === 'binary' ? rocAuc(target, prediction) : rSquared(target, prediction) }
    const aucs = oneVsRestAucs(target, prediction)
    if (aucs.length === 0 || aucs.some((a) => !Number.isFinite(a))) return { value: NaN }
    let best = 0
    for (let c = 1; c < aucs.length; c++) if (aucs[c] > aucs[best]) best = c
    return { value: aucs[best], bestClass: classes[best] ?? String(best) }
  }
  const slices = options.slices ? sliceRows(holdout, options.slices, options.task) : []
  const overall: Record<string, number> = {}
  const bestClass: Record<string, string> = {}
  const bestSlice: Record<string, SliceSeparation> = {}
  for (const name of names) {
    if (!all.includes(name)) continue
    const model = await options.fit({
      side: options.side,
      seed: deriveSeed(options.seed, 'single-feature', name),
      refit: 0,
      leaveOut: all.filter((other) => other !== name),
    })
    const prediction = await model.predict(selectFeatures(holdout, model.featureNames))
    const whole = scoreOf(y, prediction)
    overall[name] = whole.value
    if (whole.bestClass !== undefined) bestClass[name] = whole.bestClass
    const keepBest = (slice: (typeof slices)[number], predicted: ArrayLike<number>, width: number, besideColumn: boolean) => {
      const { value: separation, bestClass: sliceClass } = scoreOf(
        Array.from(slice.rows, (i) => y[i]),
        predictionRows(predicted, slice.rows, width),
      )
      if (Number.isFinite(separation) && !(bestSlice[name]?.separation >= separation)) {
        bestSlice[name] = {
          column: slice.column,
          value: slice.value,
          rows: slice.rows.length,
          separation,
          ...(sliceClass !== undefined ? { bestClass: sliceClass } : {}),
          ...(besideColumn ? { besideColumn } : {}),
        }
      }
    }
    for (const slice of slices) if (slice.column !== name) keepBest(slice, prediction, predictionWidth(model), false)
    if (!options.withSliceColumn?.includes(name)) continue
    for (const column of new Set(slices.map((slice) => slice.column))) {
      if (column === name) continue
      const paired = await options.fit({
        side: options.side,
        seed: deriveSeed(options.seed, 'single-feature', name, 'beside', column),
        refit: 0,
        leaveOut: all.filter((other) => other !== name && other !== column),
      })
      const pairedPrediction = await paired.predict(selectFeatures(holdout, paired.featureNames))
      for (const slice of slices) if (slice.column === column) keepBest(slice, pairedPrediction, predictionWidth(paired), true)
    }
  }
  return multiclass ? { overall, bestClass, bestSlice } : { overall, bestSlice }
}

function sliceRows(holdout: Dataset, options: SliceOptions, task: Task) {
  const y = holdout.target!.values
  const slices: { column: string; value: string; rows: Uint32Array }[] = []
  holdout.features.forEach((feature, j) => {
    const categories = feature.categories
    if (feature.kind !== 'categorical' || !categories || categories.length < 2 || categories.length > options.maxLevels) return
    const members: number[][] = categories.map(() => [])
    const column = holdout.columns[j]
    for (let i = 0; i < holdout.rows; i++) if (!Number.isNaN(column[i])) members[column[i]].push(i)
    members.forEach((rows, code) => {
      let positives = 0
      for (const i of rows) positives += y[i]
      const large = task === 'binary' ? Math.min(positives, rows.length - positives) >= options.minRows : rows.length >= options.minRows
      if (large) slices.push({ column: feature.name, value: categories[code], rows: Uint32Array.from(rows) })
    })
  })
  return slices
}
