import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { levenshteinDistance } from '../../../src/core/policy/levenshtein-distance.ts'

/** The recurrence that defines the distance, evaluated without the single-row trick, for cross-checking. */
function byDefinition(a: string, b: string): number {
  const table = Array.from({ length: a.length + 1 }, (_, i) => Array.from({ length: b.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)))
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      table[i][j] = Math.min(table[i - 1][j] + 1, table[i][j - 1] + 1, table[i - 1][j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1))
    }
  }
  return table[a.length][b.length]
}

describe('levenshteinDistance(a, b)', () => {
  it('gives the textbook values', () => {
    // kitten -> sitting: substitute k/s, substitute e/i, insert g = 3 (the usual worked example; from memory).
    expect(levenshteinDistance('kitten', 'sitting')).toBe(3)
    // flaw -> lawn: delete f, insert n = 2 (worked by hand).
    expect(levenshteinDistance('flaw', 'lawn')).toBe(2)
    // refts -> refits: insert i = 1; acton -> action: insert i = 1 (by hand).
    expect(levenshteinDistance('refts', 'refits')).toBe(1)
    expect(levenshteinDistance('acton', 'action')).toBe(1)
  })

  it('is the length of the other string when one is empty', () => {
    expect(levenshteinDistance('', '')).toBe(0)
    expect(levenshteinDistance('', 'draws')).toBe(5)
    expect(levenshteinDistance('seed', '')).toBe(4)
  })

  it('agrees with the full Wagner–Fischer table and is a metric', () => {
    const word = fc.string({ unit: fc.constantFrom('a', 'b', 'c', '_'), maxLength: 8 })
    fc.assert(
      fc.property(word, word, word, (a, b, c) => {
        const ab = levenshteinDistance(a, b)
        expect(ab).toBe(byDefinition(a, b))
        expect(levenshteinDistance(b, a)).toBe(ab)
        expect(ab === 0).toBe(a === b)
        expect(ab).toBeGreaterThanOrEqual(Math.abs(a.length - b.length))
        expect(ab).toBeLessThanOrEqual(Math.max(a.length, b.length))
        expect(levenshteinDistance(a, c)).toBeLessThanOrEqual(ab + levenshteinDistance(b, c))
      }),
      { seed: 7, numRuns: 300 },
    )
  })
})
