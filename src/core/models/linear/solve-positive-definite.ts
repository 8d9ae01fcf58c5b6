/**
 * Solves A x = b for a symmetric positive definite A by Cholesky factorization A = L L^T, then
 * forward and back substitution (Golub & Van Loan, Matrix Computations, 4th ed., Algorithm 4.2.1).
 *
 * `matrix` is size x size, row-major; only its lower triangle is read and it is not modified.
 * Edges: a pivot at or below 1e-10 times its original diagonal entry (or a non-positive diagonal)
 * means A is singular to working precision, which for normal equations means column `singularAt`
 * is a linear combination of the columns before it; the result then names that column instead of
 * a solution. Cost O(size^3 / 3).
 */
export function solvePositiveDefinite(
  matrix: Float64Array,
  rhs: Float64Array,
  size: number,
): { readonly solution: Float64Array } | { readonly singularAt: number } {
  if (matrix.length !== size * size || rhs.length !== size) {
    throw new RangeError(
      `solvePositiveDefinite needs a ${size} x ${size} matrix and ${size} right-hand sides, got ${matrix.length} and ${rhs.length} values`,
    )
  }
  const l = new Float64Array(size * size)
  for (let i = 0; i < size; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = matrix[i * size + j]
      for (let k = 0; k < j; k++) sum -= l[i * size + k] * l[j * size + k]
      if (i === j) {
        const diagonal = matrix[i * size + i]
        if (!(diagonal > 0) || !(sum > 1e-10 * diagonal)) return { singularAt: i }
        l[i * size + i] = Math.sqrt(sum)
      } else {
        l[i * size + j] = sum / l[j * size + j]
      }
    }
  }
  const x = Float64Array.from(rhs)
  for (let i = 0; i < size; i++) {
    let sum = x[i]
    for (let k = 0; k < i; k++) sum -= l[i * size + k] * x[k]
    x[i] = sum / l[i * size + i]
  }
  for (let i = size - 1; i >= 0; i--) {
    let sum = x[i]
    for (let k = i + 1; k < size; k++) sum -= l[k * size + i] * x[k]
    x[i] = sum / l[i * size + i]
  }
  return { solution: x }
}
