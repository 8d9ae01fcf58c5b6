import { describe, expect, it } from 'vitest'
import { capTableRows } from '../../../src/core/data/cap-table-rows.ts'
import type { Dataset } from '../../../src/core/data/dataset.ts'

function table(rows: number): Dataset {
  const id = Float64Array.from({ length: rows }, (_, i) => i)
  return {
    rows,
    source: 'data/train.csv',
    features: [{ name: 'row', kind: 'numeric' }, { name: 'gap', kind: 'numeric' }],
    columns: [id, Float64Array.from({ length: rows }, (_, i) => (i % 10 === 0 ? NaN : i))],
    missing: [0, Math.ceil(rows / 10)],
    target: { name: 'late', values: Float64Array.from({ length: rows }, (_, i) => i % 2) },
    ids: { name: 'parcel_id', values: Array.from({ length: rows }, (_, i) => `P${i}`) },
  }
}

describe('capTableRows(table, max, seed)', () => {
  it('returns a table within the cap as it is, and says it sampled nothing', () => {
    const data = table(50)
    const { table: out, record } = capTableRows(data, 50, 7)
    expect(out).toBe(data)
    expect(record).toEqual({ rows: 50, kept: 50, seed: 7, sampled: false })
  })

  it('keeps max whole rows (values, target, id together) in the table order, the same for the same seed', () => {
    const { table: out, record } = capTableRows(table(1000), 120, 7)
    expect(record).toEqual({ rows: 1000, kept: 120, seed: 7, sampled: true })
    expect(out.rows).toBe(120)
    const rows = Array.from(out.columns[0])
    expect(rows).toEqual([...rows].sort((a, b) => a - b))
    expect(new Set(rows).size).toBe(120)
    rows.forEach((r, i) => {
      expect(out.ids!.values[i]).toBe(`P${r}`)
      expect(out.target!.values[i]).toBe(r % 2)
      expect(Number.isNaN(out.columns[1][i])).toBe(r % 10 === 0)
    })
    expect(out.missing).toEqual([0, rows.filter((r) => r % 10 === 0).length])
    expect(Array.from(capTableRows(table(1000), 120, 7).table.columns[0])).toEqual(rows)
    expect(Array.from(capTableRows(table(1000), 120, 8).table.columns[0])).not.toEqual(rows)
  })

  it('gives every row the inclusion probability max / rows of simple random sampling (Cochran 1977, ch. 2)', () => {
    // 10 rows, 3 kept, 3000 seeds: each row's count is Binomial(3000, 0.3) if the sample is simple
    // random, mean 900, SD sqrt(3000 · 0.3 · 0.7) = 25.1; every count lies within 4 SD (the seeds
    // are fixed, so this is a fixed check, not a flaky one).
    const counts = new Array(10).fill(0)
    for (let seed = 0; seed < 3000; seed++) for (const r of capTableRows(table(10), 3, seed).table.columns[0]) counts[r]++
    for (const c of counts) expect(Math.abs(c - 900)).toBeLessThan(4 * 25.1)
  })

  it('samples a 200,000-row table down to the cap', () => {
    const { table: out, record } = capTableRows(table(200_000), 50_000, 1)
    expect(record.kept).toBe(50_000)
    expect(out.columns.every((c) => c.length === 50_000)).toBe(true)
  })

  it('names itself when the cap is not a whole number of at least 1', () => {
    expect(() => capTableRows(table(5), 0, 1)).toThrow('capTableRows needs max to be a whole number >= 1, got 0')
  })
})
