import type { FeatureMatrix, Task } from '../../data/dataset.ts'
import { UserError } from '../../errors.ts'
import { resolveTrainingSubset } from '../resolve-training-subset.ts'
import type { LinearModelState, LinearTerm } from './linear-model.ts'

/**
 * The design matrix a linear fit solves on: one row per training row (in the order given), one
 * centered column per numeric feature (also scaled to SD 1) and per non-reference category level.
 * No intercept column; every column has mean 0 over the training rows.
 */
export interface StandardizedDesign {
  readonly rows: number
  readonly width: number
  /** Row-major rows x width. */
  readonly values: Float64Array
  /** The target at the training rows, in order. */
  readonly y: Float64Array
  /** What each column is, for messages: the feature name, and `= category` for a level. */
  readonly columnLabels: readonly string[]
  /** Folds an intercept and coefficients on this design back to a model on raw values. */
  toState(intercept: number, coefficients: Float64Array): LinearModelState
}

interface NumericColumn {
  readonly kind: 'numeric'
  readonly mean: number
  /** SD over the mean-imputed training column (divisor n, as scikit-learn's StandardScaler); 0 = constant. */
  readonly sd: number
  /** Index of its design column, -1 when the feature is constant or all missing. */
  readonly column: number
}

interface CategoricalColumn {
  readonly kind: 'categorical'
  readonly dictionarySize: number
  /** Levels seen in training, ascending; levels[0] is the reference. */
  readonly levels: readonly number[]
  /** Training frequency of each seen level among rows where the feature is present. */
  readonly frequencies: readonly number[]
  /** Design column of levels[1] (the others follow). */
  readonly firstColumn: number
}

/**
 * Builds the standardized design of a linear fit. Numeric features: NaN is imputed with the training
 * mean, then x -> (x - mean) / sd with the SD of the imputed column (divisor n), so the penalty
 * treats every feature on the same scale; a constant or all-missing feature gets no column and a zero
 * coefficient. Categorical features (integer codes): one indicator column per level seen in training
 * except the lowest (the reference), centered by its frequency; NaN rows get the frequencies (the
 * mean), so they sit at 0 like an imputed numeric value. `toState` undoes all of it.
 * Edges: RangeError (starting with `caller`) for bad rows, features, targets or category codes.
 * Cost O(rows x columns) time and memory.
 */
export function buildStandardizedDesign(
  caller: string,
  task: Task,
  matrix: FeatureMatrix,
  target: Float64Array,
  options: { readonly rows?: ArrayLike<number>; readonly features?: readonly number[] },
): StandardizedDesign {
  const { positions, features, y } = resolveTrainingSubset(
    caller, { rows: matrix.rows, features: matrix.features.length }, target, task, options,
  )
  const n = positions.length
  const specs: Array<NumericColumn | CategoricalColumn> = []
  const columnLabels: string[] = []
  for (const j of features) {
    const info = matrix.features[j]
    const values = matrix.columns[j]
    if (info.kind === 'categorical') {
      const spec = describeCategorical(caller, info.name, values, positions, info.categories?.length, columnLabels.length)
      for (const level of spec.levels.slice(1)) columnLabels.push(`${info.name} = ${info.categories?.[level] ?? level}`)
      specs.push(spec)
    } else {
      const spec = describeNumeric(values, positions, columnLabels.length)
      if (spec.column >= 0) columnLabels.push(info.name)
      specs.push(spec)
    }
  }
  const width = columnLabels.length
  const design = new Float64Array(n * width)
  specs.forEach((spec, s) => {
    const values = matrix.columns[features[s]]
    if (spec.kind === 'numeric') {
      if (spec.column < 0) return
      for (let p = 0, at = spec.column; p < n; p++, at += width) {
        const x = values[positions[p]]
        design[at] = x !== x ? 0 : (x - spec.mean) / spec.sd
      }
      return
    }
    for (let l = 1; l < spec.levels.length; l++) {
      const level = spec.levels[l]
      const frequency = spec.frequencies[l]
      for (let p = 0, at = spec.firstColumn + l - 1; p < n; p++, at += width) {
        const code = values[positions[p]]
        design[at] = code !== code ? 0 : (code === level ? 1 : 0) - frequency
      }
    }
  })

  const featureNames = features.map((j) => matrix.features[j].name)
  function toState(intercept: number, coefficients: Float64Array): LinearModelState {
    let rawIntercept = intercept
    const terms: LinearTerm[] = specs.map((spec) => {
      if (spec.kind === 'numeric') {
        if (spec.column < 0) return { kind: 'numeric', coefficient: 0, fill: spec.mean }
        const coefficient = coefficients[spec.column] / spec.sd
        rawIntercept -= coefficient * spec.mean
        return { kind: 'numeric', coefficient, fill: spec.mean }
      }
      if (spec.levels.length === 0) return { kind: 'categorical', coefficients: [], fill: 0 }
      let fill = 0
      const byLevel = new Map<number, number>([[spec.levels[0], 0]])
      for (let l = 1; l < spec.levels.length; l++) {
        const beta = coefficients[spec.firstColumn + l - 1]
        byLevel.set(spec.levels[l], beta)
        fill += spec.frequencies[l] * beta
      }
      rawIntercept -= fill
      const size = Math.max(spec.dictionarySize, spec.levels[spec.levels.length - 1] + 1)
      const perCode = Array.from({ length: size }, (_, code) => byLevel.get(code) ?? fill)
      return { kind: 'categorical', coefficients: perCode, fill }
    })
    return { task, featureNames, intercept: rawIntercept, terms }
  }

  return { rows: n, width, values: design, y, columnLabels, toState }
}

function describeNumeric(values: Float64Array, positions: Int32Array, column: number): NumericColumn {
  const n = positions.length
  let sum = 0
  let present = 0
  for (let p = 0; p < n; p++) {
    const x = values[positions[p]]
    if (x === x) {
      sum += x
      present++
    }
  }
  if (present === 0) return { kind: 'numeric', mean: 0, sd: 0, column: -1 }
  const mean = sum / present
  let squares = 0
  for (let p = 0; p < n; p++) {
    const x = values[positions[p]]
    if (x === x) squares += (x - mean) * (x - mean)
  }
  const sd = Math.sqrt(squares / n)
  return { kind: 'numeric', mean, sd, column: sd > 0 ? column : -1 }
}

function describeCategorical(
  caller: string,
  name: string,
  values: Float64Array,
  positions: Int32Array,
  dictionarySize: number | undefined,
  firstColumn: number,
): CategoricalColumn {
  const counts = new Map<number, number>()
  let present = 0
  for (let p = 0; p < positions.length; p++) {
    const code = values[positions[p]]
    if (code !== code) continue
    if (!Number.isInteger(code) || code < 0) {
      throw new RangeError(`${caller}: categorical feature '${name}' has code ${code} in row ${positions[p]}; codes are whole numbers >= 0`)
    }
    counts.set(code, (counts.get(code) ?? 0) + 1)
    present++
  }
  const levels = [...counts.keys()].sort((a, b) => a - b)
  const frequencies = levels.map((level) => counts.get(level)! / present)
  return { kind: 'categorical', dictionarySize: dictionarySize ?? 0, levels, frequencies, firstColumn }
}

/**
 * The UserError for normal equations that are singular: with no penalty, a column that is a linear
 * combination of earlier ones has no unique coefficient.
 */
export function collinearityError(caller: string, label: string): UserError {
  return new UserError(
    `${caller}: '${label}' is a linear combination of the features before it on the training rows, so the unpenalized fit has no unique coefficients.`,
    'Give the linear learner a positive l2 penalty, or drop one of the collinear features.',
  )
}
