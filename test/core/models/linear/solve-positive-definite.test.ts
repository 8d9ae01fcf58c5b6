import { describe, expect, it } from 'vitest'
import { solvePositiveDefinite } from '../../../../src/core/models/linear/solve-positive-definite.ts'

describe('solvePositiveDefinite(matrix, rhs, size)', () => {
  it('solves the classic 3 x 3 Cholesky example', () => {
    // A = [[4, 12, -16], [12, 37, -43], [-16, -43, 98]] = L L^T with L = [[2,0,0],[6,1,0],[-8,5,3]]
    // (worked by hand; a common textbook example). b = A [1, 2, 3] = [-20, -43, 192].
    const a = Float64Array.of(4, 12, -16, 12, 37, -43, -16, -43, 98)
    const solved = solvePositiveDefinite(a, Float64Array.of(-20, -43, 192), 3)
    if (!('solution' in solved)) throw new Error('expected a solution')
    expect(Array.from(solved.solution)).toEqual([1, 2, 3].map((v) => expect.closeTo(v, 12)))
  })

  it('names the first column that depends on the ones before it', () => {
    // Column 2 = 2 x column 1 in a Gram matrix: [[1, 2, 0], [2, 4, 0], [0, 0, 1]].
    const a = Float64Array.of(1, 2, 0, 2, 4, 0, 0, 0, 1)
    expect(solvePositiveDefinite(a, Float64Array.of(1, 2, 3), 3)).toEqual({ singularAt: 1 })
  })
})
