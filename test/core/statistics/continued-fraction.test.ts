import { describe, expect, it } from 'vitest'
import { InternalError } from '../../../src/core/errors.ts'
import { continuedFraction } from '../../../src/core/statistics/continued-fraction.ts'

const limits = { maxTerms: 500, caller: 'test' }

describe('continuedFraction(leading, numerator, denominator, limits)', () => {
  it('evaluates 1 + 1/(1 + 1/(1 + ...)) to the golden ratio', () => {
    // Derived: the fraction f satisfies f = 1 + 1/f, so f = (1 + sqrt 5) / 2.
    expect(continuedFraction(1, () => 1, () => 1, limits)).toBeCloseTo((1 + Math.sqrt(5)) / 2, 14)
  })
  it("evaluates Lambert's fraction for tan x, whose leading term is zero", () => {
    // Lambert (1768): tan x = x / (1 − x² / (3 − x² / (5 − ...))); compared with Math.tan.
    const x = 1.3
    const value = continuedFraction(0, (j) => (j === 1 ? x : -x * x), (j) => 2 * j - 1, limits)
    expect(value).toBeCloseTo(Math.tan(x), 13)
  })
  it('throws an InternalError naming the caller when it does not converge', () => {
    // 1 + 1/(1 + 1/...) gains about 0.4 digits per term: 5 terms cannot reach 1e-15.
    const run = (): number => continuedFraction(1, () => 1, () => 1, { maxTerms: 5, caller: 'someCaller' })
    expect(run).toThrow(InternalError)
    expect(run).toThrow('someCaller: continued fraction did not converge in 5 terms')
  })
})
