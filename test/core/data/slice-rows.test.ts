import { describe, expect, it } from 'vitest'
import type { SliceFilter } from '../../../src/core/config.ts'
import { parseCsv } from '../../../src/core/data/parse-csv.ts'
import { describeSliceFilter, sliceRows } from '../../../src/core/data/slice-rows.ts'
import { userErrorText } from './user-error-text.ts'

// Six invented parcels; the expected rows are read off the table by hand.
const data = parseCsv(
  ['depot,distance_km,rain_mm,late', 'harbour,4,NA,1', 'airport,20,1.5,0', 'harbour,20,0,0', 'ringway,31.5,3,1', 'airport,NA,2,1', 'harbour,10,NA,0'].join('\n'),
  { source: 'd.csv', target: 'late' },
)
const rows = (where: SliceFilter) => Array.from(sliceRows(data, where, { name: 's', index: 0 }) ?? [])

describe('sliceRows(data, filter)', () => {
  it('keeps the rows each comparison selects; a missing value satisfies none but is_missing', () => {
    expect(rows({ column: 'depot', equals: 'harbour' })).toEqual([0, 2, 5])
    expect(rows({ column: 'depot', in: ['airport', 'ringway', 'depot-9'] })).toEqual([1, 3, 4])
    expect(rows({ column: 'distance_km', equals: '20' })).toEqual([1, 2])
    expect(rows({ column: 'distance_km', atLeast: 20 })).toEqual([1, 2, 3])
    expect(rows({ column: 'distance_km', below: 20 })).toEqual([0, 5])
    expect(rows({ column: 'distance_km', between: [10, 31.5] })).toEqual([1, 2, 5])
    expect(rows({ column: 'rain_mm', isMissing: true })).toEqual([0, 5])
    expect(rows({ column: 'rain_mm', isMissing: false })).toEqual([1, 2, 3, 4])
  })

  it('combines filters with all_of and any_of, and says them in words', () => {
    const where: SliceFilter = { allOf: [{ column: 'depot', equals: 'harbour' }, { anyOf: [{ column: 'rain_mm', isMissing: true }, { column: 'distance_km', atLeast: 15 }] }] }
    expect(rows(where)).toEqual([0, 2, 5])
    expect(describeSliceFilter(where)).toBe('depot = harbour and (rain_mm is missing or distance_km ≥ 15)')
    expect(sliceRows(data, { column: 'van_type', equals: 'small' }, { name: 's', index: 0 })).toBeNull()
  })

  it('refuses a size comparison of a categorical column and text for a numeric one, naming the slice and key', () => {
    expect(userErrorText(() => sliceRows(data, { allOf: [{ column: 'depot', atLeast: 3 }] }, { name: 'big depots', index: 2 }))).toBe(
      "The slice 'big depots': slices[2].where.all_of[0].at_least compares the categorical column 'depot' by size; categories have no order. | Use equals or in with its categories (airport, harbour, ringway).",
    )
    expect(userErrorText(() => sliceRows(data, { column: 'distance_km', in: ['far'] }, { name: 'far', index: 0 }))).toBe(
      "The slice 'far': slices[0].where.in compares the numeric column 'distance_km' with 'far', which is not a number. | Write a number, or give 'distance_km' the role categorical in data.columns.",
    )
  })
})
