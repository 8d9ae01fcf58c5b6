import { describe, expect, it } from 'vitest'
import type { FeatureMatrix } from '../../../src/core/data/dataset.ts'
import { correlatedGroups } from '../../../src/core/importance/correlated-groups.ts'

const matrix = (columns: Record<string, number[]>, categorical: string[] = []): FeatureMatrix => ({
  rows: Object.values(columns)[0].length,
  features: Object.keys(columns).map((name) => (categorical.includes(name) ? { name, kind: 'categorical' as const, categories: ['a', 'b', 'c', 'd', 'e'] } : { name, kind: 'numeric' as const })),
  columns: Object.values(columns).map((v) => Float64Array.from(v)),
})

describe('correlatedGroups (single linkage on |Spearman rho|)', () => {
  // scipy.stats.spearmanr([1,2,3,4,5], [5,6,7,8,7]) = 0.8207826816681233 (/work/shared check values, computed).
  const data = matrix({ x: [1, 2, 3, 4, 5], y: [5, 6, 7, 8, 7], flipped: [50, 40, 30, 20, 10], code: [0, 1, 2, 3, 4], other: [3, 1, 4, 1, 5] }, ['code'])

  it('links a pair exactly at the threshold and not just above it; a negative rho links like a positive one', () => {
    const at = correlatedGroups(data, { threshold: 0.8207826816681, maxRows: 100, seed: 1 })
    expect(at.map((g) => g.members)).toEqual([['x', 'y', 'flipped']])
    expect(at[0].weakestLink).toBeCloseTo(0.8207826816681233, 12)
    expect(at[0].name).toBe('x ~ y ~ flipped')
    // Above the x–y value only x and flipped (rho = −1) stay linked; code is categorical and never grouped.
    const above = correlatedGroups(data, { threshold: 0.821, maxRows: 100, seed: 1 })
    expect(above.map((g) => g.members)).toEqual([['x', 'flipped']])
    expect(above[0].weakestLink).toBeCloseTo(1, 12)
  })

  it('skips missing values pairwise and leaves a constant column alone', () => {
    const withGaps = matrix({ a: [1, 2, NaN, 4, 5, 6], b: [2, 4, 100, 8, 10, 12], constant: [7, 7, 7, 7, 7, 7] })
    const groups = correlatedGroups(withGaps, { threshold: 0.9, maxRows: 100, seed: 1 })
    expect(groups.map((g) => g.members)).toEqual([['a', 'b']])
    expect(groups[0].weakestLink).toBeCloseTo(1, 12)
  })
})
