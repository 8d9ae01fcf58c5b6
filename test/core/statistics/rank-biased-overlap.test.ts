import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { rankBiasedOverlap } from '../../../src/core/statistics/rank-biased-overlap.ts'

const letters = (text: string): string[] => [...text]

/** (1 − p) Σ_{d=1..depth} p^{d−1} · agreement(d): the definition of RBO, summed far enough down. */
function seriesSum(agreement: (d: number) => number, p: number, depth: number): number {
  let sum = 0
  for (let d = 1; d <= depth; d++) sum += (1 - p) * p ** (d - 1) * agreement(d)
  return sum
}

/** |top-d of a ∩ top-d of b| / d, for explicit (already continued) lists. */
function prefixAgreement(a: readonly string[], b: readonly string[], d: number): number {
  const top = new Set(a.slice(0, d))
  return b.slice(0, d).filter((item) => top.has(item)).length / d
}

describe('rankBiasedOverlap(a, b, {persistence})', () => {
  it('reproduces the check values for equal-length lists', () => {
    // RBO_EXT, RBO_MIN and residual of Webber, Moffat & Zobel (2010), ACM TOIS 28(4), for [1..5] vs
    // [2,3,4,1,5], p = 0.9; computed from the paper's definitions.
    const result = rankBiasedOverlap(letters('12345'), letters('23415'), { persistence: 0.9 })
    expect(result.extrapolated).toBeCloseTo(0.828, 12)
    expect(result.minimum).toBeCloseTo(0.4999889406, 10)
    expect(result.residual).toBeCloseTo(0.3280110594, 10)
    // RBO_EXT (Webber, Moffat & Zobel 2010), abcde vs bacde / abced / edcba, p = 0.9; computed from the definition.
    expect(rankBiasedOverlap(letters('abcde'), letters('bacde'), { persistence: 0.9 }).extrapolated).toBeCloseTo(0.9, 12)
    expect(rankBiasedOverlap(letters('abcde'), letters('abced'), { persistence: 0.9 }).extrapolated).toBeCloseTo(
      0.981775,
      12,
    )
    expect(rankBiasedOverlap(letters('abcde'), letters('edcba'), { persistence: 0.9 }).extrapolated).toBeCloseTo(
      0.737775,
      12,
    )
  })
  it('gives 1 for identical lists, with nothing left to learn below them', () => {
    // By hand: every agreement is 1, so RBO_EXT = 1; min + residual = max = 1.
    const result = rankBiasedOverlap(letters('abcd'), letters('abcd'), { persistence: 0.8 })
    expect(result.extrapolated).toBeCloseTo(1, 14)
    expect(result.minimum + result.residual).toBeCloseTo(1, 14)
  })
  it('matches the defining sums over worst- and best-case continuations of uneven lists', () => {
    // Definition check (Webber et al. 2010, §4): continue the lists explicitly and sum the series.
    // Worst case: every unseen item is new. Best case: the short list continues with the long
    // list's unmatched items in order, then both continue so that each new item matches the
    // other list's earliest unmatched one.
    const short = letters('qaxb')
    const long = letters('abcdqefg')
    const p = 0.7
    const depth = 400
    const worstShort = [...short, ...Array.from({ length: depth }, (_, i) => `new-short-${i}`)]
    const worstLong = [...long, ...Array.from({ length: depth }, (_, i) => `new-long-${i}`)]
    const unmatchedInLong = long.filter((item) => !short.includes(item)) // c d e f g
    const unmatchedInShort = short.filter((item) => !long.includes(item)) // x
    const bestShort = [...short, ...unmatchedInLong, ...Array.from({ length: depth }, (_, i) => `both-${i}`)]
    const bestLong = [...long, ...unmatchedInShort, ...Array.from({ length: depth }, (_, i) => `both-${i}`)]
    const minimum = seriesSum((d) => prefixAgreement(worstShort, worstLong, d), p, depth)
    const maximum = seriesSum((d) => prefixAgreement(bestShort, bestLong, d), p, depth)
    const result = rankBiasedOverlap(short, long, { persistence: p })
    expect(result.minimum).toBeCloseTo(minimum, 12)
    expect(result.minimum + result.residual).toBeCloseTo(maximum, 12)
  })
  it('matches the defining sum of the extrapolated agreements for uneven lists', () => {
    // RBO_EXT's assumption (Webber et al. 2010, §5): below depth s the short list keeps its
    // agreement X_s / s on the items it has not shown; below l the agreement stays at A_l.
    const short = letters('qaxb')
    const long = letters('abcdqefg')
    const p = 0.7
    const s = short.length
    const l = long.length
    const seen = (d: number): number => long.slice(0, d).filter((item) => short.includes(item)).length
    const xs = prefixAgreement(short, long, s) * s
    const agreement = (d: number): number => {
      const depth = Math.min(d, l)
      if (depth <= s) return prefixAgreement(short, long, depth)
      return seen(depth) / depth + (xs * (depth - s)) / (s * depth)
    }
    const result = rankBiasedOverlap(short, long, { persistence: p })
    expect(result.extrapolated).toBeCloseTo(seriesSum(agreement, p, 400), 12)
  })
  it('does not depend on which list comes first', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.constantFrom(...letters('abcdefghij')), { maxLength: 10 }),
        fc.uniqueArray(fc.constantFrom(...letters('abcdefghij')), { minLength: 1, maxLength: 10 }),
        fc.double({ min: 0.05, max: 0.95, noNaN: true }),
        (a, b, persistence) => {
          const forward = rankBiasedOverlap(a, b, { persistence })
          const backward = rankBiasedOverlap(b, a, { persistence })
          const close = (x: number, y: number): boolean => (Number.isNaN(x) ? Number.isNaN(y) : Math.abs(x - y) < 1e-12)
          return (
            close(forward.extrapolated, backward.extrapolated) &&
            close(forward.minimum, backward.minimum) &&
            close(forward.residual, backward.residual)
          )
        },
      ),
    )
  })
  it('keeps the extrapolated value between the minimum and the maximum', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.constantFrom(...letters('abcdefghij')), { minLength: 1, maxLength: 10 }),
        fc.uniqueArray(fc.constantFrom(...letters('abcdefghij')), { minLength: 1, maxLength: 10 }),
        fc.double({ min: 0.05, max: 0.95, noNaN: true }),
        (a, b, persistence) => {
          const { extrapolated, minimum, residual } = rankBiasedOverlap(a, b, { persistence })
          return minimum - 1e-12 <= extrapolated && extrapolated <= minimum + residual + 1e-12
        },
      ),
    )
  })
  it('reports nothing known when a list is empty', () => {
    expect(rankBiasedOverlap([], letters('abc'), { persistence: 0.9 })).toEqual({
      extrapolated: NaN,
      minimum: 0,
      residual: 1,
    })
  })
  it('refuses a persistence outside (0, 1) and repeated items', () => {
    expect(() => rankBiasedOverlap(['a'], ['a'], { persistence: 1 })).toThrow(
      new RangeError('rankBiasedOverlap needs persistence in (0, 1), got 1'),
    )
    expect(() => rankBiasedOverlap(['a', 'b'], ['b', 'c', 'b'], { persistence: 0.9 })).toThrow(
      new RangeError("rankBiasedOverlap needs distinct items in each list; 'b' appears twice in the second list"),
    )
  })
})
