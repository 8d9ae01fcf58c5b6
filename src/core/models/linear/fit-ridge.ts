import type { FeatureMatrix } from '../../data/dataset.ts'
import { LinearModel } from './linear-model.ts'
import { solvePositiveDefinite } from './solve-positive-definite.ts'
import { buildStandardizedDesign, collinearityError } from './build-standardized-design.ts'

/**
 * Ridge regression (Hoerl & Kennard 1970, Technometrics 12(1)): minimizes
 * sum_i (y_i - b0 - z_i . beta)^2 + l2 ||beta||^2 over standardized inputs z (see
 * buildStandardizedDesign), intercept b0 unpenalized. This is scikit-learn's Ridge(alpha = l2)
 * objective applied to StandardScaler output, and l2 = 0 is ordinary least squares. Solved in closed
 * form: b0 = mean(y), (Z^T Z + l2 I) beta = Z^T y by Cholesky; the result is folded back to raw values.
 * Deterministic; `rows` fixes which rows are used and their (rounding-only) order, `features` which
 * columns. Edges: with l2 = 0 and collinear features a UserError names the offending feature.
 * Cost O(rows x columns^2 + columns^3).
 */
export function fitRidge(
  matrix: FeatureMatrix,
  target: Float64Array,
  options: { readonly l2: number; readonly rows?: ArrayLike<number>; readonly features?: readonly number[] },
): LinearModel {
  const { l2 } = options
  if (!(l2 >= 0) || !Number.isFinite(l2)) throw new RangeError(`fitRidge needs l2 >= 0, got ${l2}`)
  const design = buildStandardizedDesign('fitRidge', 'regression', matrix, target, options)
  const { rows: n, width: q, values: z, y } = design
  let mean = 0
  for (let i = 0; i < n; i++) mean += y[i]
  mean /= n
  const gram = new Float64Array(q * q)
  const rhs = new Float64Array(q)
  for (let i = 0, row = 0; i < n; i++, row += q) {
    const residual = y[i] - mean
    for (let a = 0; a < q; a++) {
      const za = z[row + a]
      if (za === 0) continue
      rhs[a] += za * residual
      for (let b = 0; b <= a; b++) gram[a * q + b] += za * z[row + b]
    }
  }
  for (let a = 0; a < q; a++) gram[a * q + a] += l2
  const solved = solvePositiveDefinite(gram, rhs, q)
  if ('singularAt' in solved) throw collinearityError('fitRidge', design.columnLabels[solved.singularAt])
  return new LinearModel(design.toState(mean, solved.solution))
}
