import { describe, expect, it } from 'vitest'
import { alignHoldout } from '../../../src/core/data/align-holdout.ts'
import { parseCsv } from '../../../src/core/data/parse-csv.ts'

// Invented courier rows for this test only.
const header = 'depot,distance_km,late'
const rows = ['harbour,3.5,1', 'airport,12,0', 'harbour,3.5,1', 'ringway,7.25,0', 'airport,1,1']
const read = (lines: readonly string[], head = header) => parseCsv([head, ...lines].join('\n'), { source: 'h.csv', target: 'late', task: 'binary', roles: {} })
const asRows = (d: ReturnType<typeof read>) =>
  Array.from({ length: d.rows }, (_, i) => `${d.features[0].categories![d.columns[0][i]]},${d.columns[1][i]},${d.target!.values[i]}`)

describe('alignHoldout(base, head) without ids', () => {
  it('puts a reordered holdout (the same multiset of rows, duplicates included) back in the base order', () => {
    const base = read(rows)
    const head = read([rows[3], rows[2], rows[4], rows[0], rows[1]])
    expect(asRows(alignHoldout(base, head))).toEqual(asRows(base))
  })

  it('matches on the shared columns only, so an added column travels with its row', () => {
    const base = read(rows)
    const head = read(['ringway,7.25,0,d', 'harbour,3.5,1,b', 'airport,1,1,e', 'harbour,3.5,1,a', 'airport,12,0,c'], `${header},sorting_belt`)
    const aligned = alignHoldout(base, head)
    const belt = aligned.features.findIndex((f) => f.name === 'sorting_belt')
    const belts = Array.from(aligned.columns[belt], (v) => aligned.features[belt].categories![v])
    expect(belts[1]).toBe('c')
    expect(belts[3]).toBe('d')
    expect(belts[4]).toBe('e')
  })

  it('leaves the head as it is when one value differs, for the holdout-rows check to judge', () => {
    const base = read(rows)
    const head = read([rows[1], rows[0], rows[2], 'ringway,7.25,1', rows[4]])
    expect(alignHoldout(base, head)).toBe(head)
  })
})
