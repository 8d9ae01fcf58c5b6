import type { FeatureMatrix } from '../../data/dataset.ts'
import { LinearModel } from './linear-model.ts'
import { solvePositiveDefinite } from './solve-positive-definite.ts'
import { buildStandardizedDesign, collinearityError, type StandardizedDesign } from './build-standardized-design.ts'

/**
 * L2-regularized logistic regression: minimizes
 * sum_i [log(1 + exp(eta_i)) - y_i eta_i] + (l2 / 2) ||beta||^2 with eta_i = b0 + z_i . beta over
 * standardized inputs z (see buildStandardizedDesign), intercept b0 unpenalized. This is
 * scikit-learn's LogisticRegression(C = 1 / l2) objective applied to StandardScaler output.
 * Solved by Newton's method (iteratively reweighted least squares) with backtracking line search,
 * stopping when half the squared Newton decrement is at most 1e-12 (1 + objective) (Boyd &
 * Vandenberghe 2004, Convex Optimization, Algorithms 9.2 and 9.5). Deterministic.
 * Edges: a target with one class gives the clamped log-odds of its rate (1e-6) as intercept and no
 * slopes; separable data with l2 = 0 has no minimizer, so the fit stops at maxIterations (default
 * 100) with `convergence.converged` false; with l2 = 0 and collinear features a UserError names the
 * offending feature. Cost O(iterations x rows x columns^2).
 */
export function fitLogistic(
  matrix: FeatureMatrix,
  target: Float64Array,
  options: {
    readonly l2: number
    readonly rows?: ArrayLike<number>
    readonly features?: readonly number[]
    readonly maxIterations?: number
  },
): LinearModel {
  const { l2 } = options
  const maxIterations = options.maxIterations ?? 100
  if (!(l2 >= 0) || !Number.isFinite(l2)) throw new RangeError(`fitLogistic needs l2 >= 0, got ${l2}`)
  if (!Number.isInteger(maxIterations) || maxIterations < 1) {
    throw new RangeError(`fitLogistic needs maxIterations to be a whole number >= 1, got ${maxIterations}`)
  }
  const design = buildStandardizedDesign('fitLogistic', 'binary', matrix, target, options)
  const { rows: n, width: q, y } = design
  let positives = 0
  for (let i = 0; i < n; i++) positives += y[i]
  const rate = Math.min(1 - 1e-6, Math.max(1e-6, positives / n))
  // theta = [b0, beta_1..beta_q]
  const theta = new Float64Array(q + 1)
  theta[0] = Math.log(rate / (1 - rate))
  const finish = (iterations: number, converged: boolean) =>
    new LinearModel(design.toState(theta[0], theta.subarray(1)), { iterations, converged })
  if (positives === 0 || positives === n) return finish(0, true)
  const size = q + 1
  const eta = new Float64Array(n)
  const candidate = new Float64Array(size)
  let objective = computeObjective(design, theta, l2, eta)
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    const { gradient, hessian } = newtonSystem(design, theta, l2, eta)
    const solved = solvePositiveDefinite(hessian, gradient, size)
    if ('singularAt' in solved) {
      // At the start every weight is rate (1 - rate) > 0, so a singular Hessian means collinear
      // columns; later it means weights vanishing on (nearly) separable data.
      if (iteration === 1) throw collinearityError('fitLogistic', design.columnLabels[solved.singularAt - 1])
      return finish(iteration - 1, false)
    }
    const direction = solved.solution // theta moves by -t * direction
    let decrementSquared = 0
    for (let k = 0; k < size; k++) decrementSquared += gradient[k] * direction[k]
    const isDone = decrementSquared / 2 <= 1e-12 * (1 + objective)
    // Backtracking: accept t when f(theta - t d) <= f(theta) - 0.01 t (g . d), halving t from 1.
    let t = 1
    let next = Infinity
    for (let halvings = 0; halvings < 60; halvings++, t /= 2) {
      for (let k = 0; k < size; k++) candidate[k] = theta[k] - t * direction[k]
      next = computeObjective(design, candidate, l2, eta)
      if (next <= objective - 0.01 * t * decrementSquared) break
    }
    // No step lowers the objective: theta is as close as floating point allows.
    if (!(next <= objective)) return finish(iteration, isDone)
    theta.set(candidate)
    objective = next
    if (isDone) return finish(iteration, true)
  }
  return finish(maxIterations, false)
}

/** The penalized negative log-likelihood at theta; leaves the linear predictor in `eta`. */
function computeObjective(design: StandardizedDesign, theta: Float64Array, l2: number, eta: Float64Array): number {
  const { rows: n, width: q, values: z, y } = design
  let sum = 0
  for (let i = 0, row = 0; i < n; i++, row += q) {
    let e = theta[0]
    for (let a = 0; a < q; a++) e += z[row + a] * theta[a + 1]
    eta[i] = e
    // log(1 + exp(e)) without overflow.
    sum += (e > 0 ? e + Math.log1p(Math.exp(-e)) : Math.log1p(Math.exp(e))) - y[i] * e
  }
  let penalty = 0
  for (let a = 1; a <= q; a++) penalty += theta[a] * theta[a]
  return sum + 0.5 * l2 * penalty
}

/** Gradient and Hessian (lower triangle, row-major) of the objective at theta, given its `eta`. */
function newtonSystem(
  design: StandardizedDesign,
  theta: Float64Array,
  l2: number,
  eta: Float64Array,
): { gradient: Float64Array; hessian: Float64Array } {
  const { rows: n, width: q, values: z, y } = design
  const size = q + 1
  const gradient = new Float64Array(size)
  const hessian = new Float64Array(size * size)
  for (let i = 0, row = 0; i < n; i++, row += q) {
    const p = 1 / (1 + Math.exp(-eta[i]))
    const residual = p - y[i]
    const w = p * (1 - p)
    gradient[0] += residual
    hessian[0] += w
    for (let a = 0; a < q; a++) {
      const za = z[row + a]
      if (za === 0) continue
      const wa = w * za
      gradient[a + 1] += residual * za
      const at = (a + 1) * size
      hessian[at] += wa
      for (let b = 0; b <= a; b++) hessian[at + b + 1] += wa * z[row + b]
    }
  }
  for (let a = 1; a <= q; a++) {
    gradient[a] += l2 * theta[a]
    hessian[a * size + a] += l2
  }
  return { gradient, hessian }
}
