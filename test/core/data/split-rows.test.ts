import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { parseCsv } from '../../../src/core/data/parse-csv.ts'
import { selectRows, type Dataset } from '../../../src/core/data/dataset.ts'
import { splitRows } from '../../../src/core/data/split-rows.ts'
import { userErrorText } from './user-error-text.ts'

/** A parcel table (invented demo data) with ids P0..P(n-1), a numeric and a categorical feature. */
function parcels(n: number, idOf = (i: number) => `P${i}`): Dataset {
  const lines = ['parcel_id,distance_km,depot,late']
  for (let i = 0; i < n; i++) lines.push(`${idOf(i)},${i % 7 === 0 ? 'NA' : i},${['north', 'south'][i % 2]},${i % 3 === 0 ? 'yes' : 'no'}`)
  return parseCsv(lines.join('\n'), { source: 'parcels.csv', target: 'late', roles: { parcel_id: 'id' } })
}

describe('splitRows(dataset, {fraction, seed, by})', () => {
  it('puts exactly the ids whose seeded hash is below fraction * 2^32 in the holdout', () => {
    // Expected set computed with a Python transcription of the rule (FNV-1a 32 of the seed's 4
    // little-endian bytes + UTF-8 id, then MurmurHash3 fmix32), seed 42, fraction 0.3.
    const data = parcels(22, (i) => (i < 20 ? `P${i}` : i === 20 ? 'dépôt-7' : ''))
    const { train, holdout } = splitRows(data, { fraction: 0.3, seed: 42, by: 'parcel_id' })
    expect(holdout.ids?.values).toEqual(['P5', 'P16', 'P18'])
    expect(train.rows).toBe(19)
    expect(holdout.target?.classes).toEqual(data.target?.classes)
    expect(Array.from(holdout.columns[0])).toEqual([5, 16, 18])
  })

  it('puts the same ids in the holdout whatever the row order (property)', () => {
    const data = parcels(60)
    const expected = new Set(splitRows(data, { fraction: 0.25, seed: 9, by: 'parcel_id' }).holdout.ids!.values)
    fc.assert(
      fc.property(fc.shuffledSubarray(Array.from({ length: 60 }, (_, i) => i), { minLength: 60 }), (order) => {
        const shuffled = selectRows<Dataset>(data, order)
        const { holdout } = splitRows(shuffled, { fraction: 0.25, seed: 9, by: 'parcel_id' })
        expect(new Set(holdout.ids!.values)).toEqual(expected)
      }),
      { seed: 31, numRuns: 100 },
    )
  })

  it('keeps repeated ids together and changes the split with the seed', () => {
    const data = parcels(400, (i) => `P${i % 100}`)
    const a = splitRows(data, { fraction: 0.3, seed: 1, by: 'parcel_id' })
    const inHoldout = new Set(a.holdout.ids!.values)
    expect(a.train.ids!.values.some((id) => inHoldout.has(id))).toBe(false)
    const b = splitRows(data, { fraction: 0.3, seed: 2, by: 'parcel_id' })
    expect(b.holdout.ids!.values).not.toEqual(a.holdout.ids!.values)
  })

  it('sends about fraction of sequential ids to the holdout', () => {
    // 10000 ids at 0.2: the binomial SD of the share is 0.004, so 0.02 is five SDs.
    const data = parcels(10000)
    const { holdout } = splitRows(data, { fraction: 0.2, seed: 3, by: 'parcel_id' })
    expect(Math.abs(holdout.rows / 10000 - 0.2)).toBeLessThan(0.02)
  })

  it('without by, takes round(fraction * rows) rows by a seeded shuffle, keeping file order', () => {
    const data = parcels(50)
    const a = splitRows(data, { fraction: 0.25, seed: 5 })
    expect(a.holdout.rows).toBe(13) // Math.round(12.5)
    expect(a.train.rows).toBe(37)
    const ids = a.holdout.ids!.values.map((id) => Number(id.slice(1)))
    expect(ids).toEqual([...ids].sort((x, y) => x - y))
    expect(splitRows(data, { fraction: 0.25, seed: 5 }).holdout.ids).toEqual(a.holdout.ids)
    expect(splitRows(data, { fraction: 0.25, seed: 6 }).holdout.ids).not.toEqual(a.holdout.ids)
  })

  it('recounts missing cells on each side', () => {
    const data = parcels(50)
    const { train, holdout } = splitRows(data, { fraction: 0.3, seed: 11 })
    expect(train.missing[0] + holdout.missing[0]).toBe(data.missing[0])
    expect(holdout.missing[0]).toBe(Array.from(holdout.columns[0]).filter(Number.isNaN).length)
    expect(train.missing[1]).toBe(0)
  })

  it('refuses a split that leaves a side empty, or a column that is not the id', () => {
    const data = parcels(3)
    expect(userErrorText(() => splitRows(data, { fraction: 0.1, seed: 1 }))).toBe(
      'Splitting parcels.csv with a holdout fraction of 0.1 leaves the holdout empty (its 3 rows). | Use a fraction further from 0 and 1, or more data.',
    )
    expect(userErrorText(() => splitRows(data, { fraction: 0.9, seed: 1 }))).toBe(
      'Splitting parcels.csv with a holdout fraction of 0.9 leaves the training part empty (its 3 rows). | Use a fraction further from 0 and 1, or more data.',
    )
    expect(userErrorText(() => splitRows(data, { fraction: 0.3, seed: 1, by: 'depot' }))).toBe(
      "Cannot split parcels.csv by 'depot': the id column is 'parcel_id'. | Give the column 'depot' the role 'id', or split without naming a column.",
    )
    const same = parcels(5, () => 'P1')
    const side = splitRows(parcels(50), { fraction: 0.5, seed: 0, by: 'parcel_id' }).holdout.ids!.values.includes('P1') ? 'training part' : 'holdout'
    expect(userErrorText(() => splitRows(same, { fraction: 0.5, seed: 0, by: 'parcel_id' }))).toBe(
      `Splitting parcels.csv with a holdout fraction of 0.5 leaves the ${side} empty (its 1 distinct id). | Use a fraction further from 0 and 1, or more data.`,
    )
  })

  it('throws a RangeError for a fraction outside (0, 1)', () => {
    expect(() => splitRows(parcels(4), { fraction: 1, seed: 1 })).toThrow('splitRows needs a fraction between 0 and 1 (exclusive), got 1')
    expect(() => splitRows(parcels(4), { fraction: NaN, seed: 1 })).toThrow(RangeError)
  })
})
