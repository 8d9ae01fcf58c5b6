// hyparquet's platform-neutral entry (its default entry under Node adds a file reader that imports fs).
import { parquetMetadata, parquetReadObjects, parquetSchema } from 'hyparquet/src/index.js'
import { compressors } from 'hyparquet-compressors'
import { UserError } from '../errors.ts'
import type { Dataset } from './dataset.ts'
import { tableToDataset, type ParseCsvOptions } from './parse-csv.ts'

/**
 * Reads the bytes of an Apache Parquet file (hyparquet 1.31, with hyparquet-compressors for Snappy,
 * gzip, Brotli, LZ4 and Zstandard pages) into the same column-major `Dataset` as `parseCsv`, by the
 * same rules and with the same messages, except that a position is "row N" (the first data row is
 * row 1) and the column names are "in the schema".
 *
 * Each cell becomes the text a CSV file would hold, and `tableToDataset` reads it: a null is missing,
 * a NaN is missing (as "NaN" is in a CSV), numbers and 64-bit integers are written in JavaScript's
 * shortest round-trip form (so a DOUBLE column comes back bit for bit), booleans as true/false,
 * timestamps as ISO 8601 text (a categorical column), text as it is. So the same table gives the
 * same Dataset whether it was saved as CSV or Parquet: kinds are inferred from the values as for a
 * CSV (a text column of digits is numeric unless `roles` declares it categorical).
 *
 * Refuses with a UserError naming the file (and the column, and the row where there is one): bytes
 * that are not a Parquet file, a nested column (list, map or struct), a binary column that is not
 * UTF-8 text, a file without rows, and everything `parseCsv` refuses. Cost: O(cells) time and
 * memory, plus the decoded file.
 */
export async function parseParquet(bytes: ArrayBuffer, options: ParseCsvOptions): Promise<Dataset> {
  const { source } = options
  let metadata: ReturnType<typeof parquetMetadata>
  try {
    metadata = parquetMetadata(bytes)
  } catch (error) {
    throw new UserError(
      `${source} is not a readable Parquet file (${error instanceof Error ? error.message : String(error)}).`,
      'Check that the path names a Parquet file and that it was written completely, or save the table as CSV instead.',
    )
  }
  const columns = parquetSchema(metadata).children
  for (const column of columns) {
    if (column.children.length > 0 || column.element.repetition_type === 'REPEATED') {
      throw new UserError(
        `${source}, column '${column.element.name}': the column is nested (a list, map or struct); plumbline reads flat columns.`,
        'Write one flat column per feature (numbers, text, booleans or timestamps).',
      )
    }
  }
  const header = columns.map((c) => c.element.name)
  if (Number(metadata.num_rows) === 0) {
    throw new UserError(`${source} has a schema but no data rows.`, 'Write the table with its rows, or check that the path names the right file.')
  }
  let records: Record<string, unknown>[]
  try {
    records = await parquetReadObjects({ file: bytes, metadata, compressors })
  } catch (error) {
    throw new UserError(
      `${source}: the Parquet data cannot be decoded (${error instanceof Error ? error.message : String(error)}).`,
      'Write the file again (Snappy, gzip, Brotli, LZ4 and Zstandard compression can be read), or save the table as CSV.',
    )
  }
  const rows = records.map((record, i) => header.map((name) => cellText(record[name], source, name, i)))
  return tableToDataset({ header, rows, place: (row) => `row ${row + 1}`, headerPlace: 'the schema' }, options)
}

function cellText(value: unknown, source: string, column: string, row: number): string {
  if (value === null || value === undefined) return ''
  switch (typeof value) {
    case 'string':
      return value
    case 'number':
    case 'bigint':
      return String(value)
    case 'boolean':
      return value ? 'true' : 'false'
  }
  const iso = (value as { toISOString?: () => string }).toISOString
  if (typeof iso === 'function') return iso.call(value)
  throw new UserError(
    `${source}, row ${row + 1}, column '${column}': the value is ${value instanceof Uint8Array ? 'binary data that is not UTF-8 text' : 'not a number, text, boolean or timestamp'}.`,
    'Write the column as numbers or text.',
  )
}
