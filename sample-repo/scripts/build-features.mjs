// Builds the model's feature tables from data/raw/deliveries.csv:
// data/train.csv and data/holdout.csv. The holdout is every parcel whose id hashes into the last
// fifth (FNV-1a), so adding a feature never moves a parcel between the two files.
// With --format parquet it writes data/train.parquet and data/holdout.parquet instead (numbers as
// DOUBLE, text as UTF-8 strings), which needs the npm package hyparquet-writer where this script is.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs'

const [headerLine, ...rows] = readFileSync('data/raw/deliveries.csv', 'utf8').trim().split('\n')
const header = headerLine.split(',')
const records = rows.map((line) => Object.fromEntries(line.split(',').map((v, i) => [header[i], v])))

// The features the model sees. Each takes a raw record and returns one value.
const features = {
  depot: (r) => r.depot,
  distance_km: (r) => r.distance_km,
  stop_count: (r) => r.stop_count,
  promised_window_h: (r) => r.promised_window_h,
  driver_shift: (r) => r.driver_shift,
  rain_forecast_mm: (r) => r.rain_forecast_mm,
  parcel_weight_kg: (r) => r.parcel_weight_kg,
}

function fnv1a(text) {
  let h = 0x811c9dc5
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i)
    h = Math.imul(h, 0x01000193)
  }
  return h >>> 0
}

const formatAt = process.argv.indexOf('--format')
const format = formatAt === -1 ? 'csv' : process.argv[formatAt + 1]
if (format !== 'csv' && format !== 'parquet') {
  console.error(`build-features: --format must be csv or parquet, got ${format}`)
  process.exit(2)
}

const columns = ['parcel_id', ...Object.keys(features), 'late']
const tables = { train: [], holdout: [] }
for (const r of records) {
  const row = [r.parcel_id, ...Object.values(features).map((f) => f(r)), r.late]
  tables[fnv1a(r.parcel_id) % 5 === 4 ? 'holdout' : 'train'].push(row)
}
mkdirSync('data', { recursive: true })
if (format === 'csv') {
  for (const [name, rows] of Object.entries(tables)) {
    writeFileSync(`data/${name}.csv`, `${[columns, ...rows].map((row) => row.join(',')).join('\n')}\n`)
  }
} else {
  const { parquetWriteBuffer } = await import('hyparquet-writer').catch(() => {
    console.error('build-features: --format parquet needs the npm package hyparquet-writer (npm install hyparquet-writer).')
    process.exit(2)
  })
  for (const [name, rows] of Object.entries(tables)) {
    const columnData = columns.map((column, j) => {
      const values = rows.map((row) => row[j])
      const numeric = values.every((v) => v !== '' && Number.isFinite(Number(v)))
      return numeric ? { name: column, data: values.map(Number), type: 'DOUBLE' } : { name: column, data: values, type: 'STRING' }
    })
    writeFileSync(`data/${name}.parquet`, new Uint8Array(parquetWriteBuffer({ columnData })))
  }
}
