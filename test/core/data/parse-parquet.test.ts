import { parquetWriteBuffer } from 'hyparquet-writer'
import { describe, expect, it } from 'vitest'
import { userErrorOf } from '../../helpers/user-error-of.ts'
import { parseCsv, schemaOf, type ParseCsvOptions } from '../../../src/core/data/parse-csv.ts'
import { parseParquet } from '../../../src/core/data/parse-parquet.ts'

// Files written by hyparquet-writer 0.17.0 (the writer companion of hyparquet, an independent
// implementation of the Apache Parquet format: Snappy-compressed pages, dictionary and plain
// encodings, definition levels for nulls). /usr/bin/python3 has neither pyarrow nor pandas (checked
// on this machine), so no file written by Arrow is used here. Rows are invented (the demo's courier).

type Column = Parameters<typeof parquetWriteBuffer>[0]['columnData'][number]
const write = (columnData: Column[]) => parquetWriteBuffer({ columnData })

const parcels: Column[] = [
  { name: 'parcel_id', data: ['P1', 'P2', 'P3', 'P4', 'P5'], type: 'STRING' },
  { name: 'distance_km', data: [4.5, null, 0.1, 12.25, 1e-7], type: 'DOUBLE' },
  { name: 'stops', data: [3, 8, null, 1, 2], type: 'INT32' },
  { name: 'weight_g', data: [1200n, 90071992547409n, 15n, null, 0n], type: 'INT64' },
  { name: 'depot', data: ['north', 'south', null, 'north', 'east'], type: 'STRING' },
  { name: 'fragile', data: [true, false, false, null, true], type: 'BOOLEAN' },
  { name: 'late', data: ['yes', 'no', 'no', 'yes', 'no'], type: 'STRING' },
]
// The same table as CSV text, as a spreadsheet would save it.
const parcelsCsv = [
  'parcel_id,distance_km,stops,weight_g,depot,fragile,late',
  'P1,4.5,3,1200,north,true,yes',
  'P2,,8,90071992547409,south,false,no',
  'P3,0.1,,15,,false,no',
  'P4,12.25,1,,north,,yes',
  'P5,1e-7,2,0,east,true,no',
].join('\n')
const options: ParseCsvOptions = { source: 'data/train.parquet', target: 'late', roles: { parcel_id: 'id' } }
const plain: ParseCsvOptions = { source: 'data/train.parquet', target: 'late' }

describe('parseParquet(bytes, options)', () => {
  it('reads DOUBLE, INT32, INT64, BOOLEAN and STRING columns with nulls into the Dataset parseCsv makes of the same table', async () => {
    const data = await parseParquet(write(parcels), options)
    const fromCsv = parseCsv(parcelsCsv, { ...options, source: 'data/train.parquet' })
    expect(data).toEqual(fromCsv)
    // Spelled out, so the comparison above cannot pass on two equally wrong readings.
    expect(data.features.map((f) => [f.name, f.kind, f.categories ?? null])).toEqual([
      ['distance_km', 'numeric', null],
      ['stops', 'numeric', null],
      ['weight_g', 'numeric', null],
      ['depot', 'categorical', ['east', 'north', 'south']],
      ['fragile', 'categorical', ['false', 'true']],
    ])
    expect(Array.from(data.columns[0])).toEqual([4.5, NaN, 0.1, 12.25, 1e-7])
    expect(Array.from(data.columns[2])).toEqual([1200, 90071992547409, 15, NaN, 0])
    expect(Array.from(data.columns[3])).toEqual([1, 2, NaN, 1, 0])
    expect(data.missing).toEqual([1, 1, 1, 1, 1])
    expect(data.ids).toEqual({ name: 'parcel_id', values: ['P1', 'P2', 'P3', 'P4', 'P5'] })
    expect(data.target).toEqual({ name: 'late', values: Float64Array.from([1, 0, 0, 1, 0]), classes: ['no', 'yes'] })
  })

  it('gives doubles back bit for bit, a NaN as missing, and reads a holdout against the training schema', async () => {
    // Up to the ±1e100 the reader accepts (larger magnitudes are refused, see parse-csv).
    const values = [Math.PI, -0, 5e-324, 9.999999999999999e99, 0.30000000000000004, NaN]
    const train = await parseParquet(write([{ name: 'x', data: values, type: 'DOUBLE' }, { name: 'y', data: [1, 2, 3, 4, 5, 6], type: 'DOUBLE' }]), {
      source: 't.parquet',
      target: 'y',
    })
    expect(Array.from(train.columns[0]).slice(0, 5)).toEqual(values.slice(0, 5).map((v) => (Object.is(v, -0) ? 0 : v)))
    expect(train.missing).toEqual([1])
    const holdout = await parseParquet(
      write([
        { name: 'y', data: [1.5], type: 'DOUBLE' },
        { name: 'x', data: [2], type: 'DOUBLE' },
        { name: 'extra', data: ['a'], type: 'STRING' },
      ]),
      { source: 'h.parquet', schema: schemaOf(train) },
    )
    expect(holdout.features.map((f) => f.name)).toEqual(['x'])
    expect(holdout.extraColumns).toEqual(['extra'])
    expect(Array.from(holdout.target!.values)).toEqual([1.5])
  })

  it('reads a timestamp column as ISO 8601 text (a categorical feature)', async () => {
    const data = await parseParquet(
      write([
        { name: 'scanned', data: [new Date('2026-03-01T08:00:00Z'), new Date('2026-03-02T09:30:00Z')], type: 'TIMESTAMP' },
        { name: 'late', data: [0, 1], type: 'INT32' },
      ]),
      { source: 's.parquet', target: 'late' },
    )
    expect(data.features[0].categories).toEqual(['2026-03-01T08:00:00.000Z', '2026-03-02T09:30:00.000Z'])
  })

  it('refuses, word for word, with the file, the row (1 = first data row) and the column', async () => {
    expect(await userErrorOf(parseParquet(new TextEncoder().encode('km,late\n1,0\n').buffer as ArrayBuffer, options))).toMatch(
      /^data\/train\.parquet is not a readable Parquet file \(.+\)\. \| Check that the path names a Parquet file and that it was written completely, or save the table as CSV instead\.$/,
    )
    expect(
      await userErrorOf(
        parseParquet(write([{ name: 'stops', data: ['3', 'three'], type: 'STRING' }, { name: 'late', data: ['no', 'yes'], type: 'STRING' }]), {
          ...plain,
          roles: { stops: 'numeric' },
        }),
      ),
    ).toBe(
      "data/train.parquet, row 2, column 'stops': 'three' is not a number, but the column is declared numeric. | Correct the value, or write NA or leave the cell empty if it is missing.",
    )
    expect(await userErrorOf(parseParquet(write([{ name: 'km', data: [1, 2], type: 'DOUBLE' }, { name: 'late', data: ['no', null], type: 'STRING' }]), plain))).toBe(
      "data/train.parquet, row 2, column 'late': the target is missing (the cell is empty). | Fill in the target or delete the row: a row without a target cannot be scored.",
    )
    expect(await userErrorOf(parseParquet(write([{ name: 'km', data: [1, 2], type: 'DOUBLE' }]), plain))).toBe(
      "data/train.parquet has no target column 'late'. Its columns are 'km'. | Add the column 'late' to the file, or name one of its columns as the target.",
    )
    expect(await userErrorOf(parseParquet(write([{ name: 'km', data: [], type: 'DOUBLE' }, { name: 'late', data: [], type: 'STRING' }]), plain))).toBe(
      'data/train.parquet has a schema but no data rows. | Write the table with its rows, or check that the path names the right file.',
    )
    expect(
      await userErrorOf(
        parseParquet(write([{ name: 'stops', data: [{ a: 1 }, { a: 2 }], type: 'VARIANT' }, { name: 'late', data: ['no', 'yes'], type: 'STRING' }]), options),
      ),
    ).toBe(
      "data/train.parquet, column 'stops': the column is nested (a list, map or struct); plumbline reads flat columns. | Write one flat column per feature (numbers, text, booleans or timestamps).",
    )
  })
})
