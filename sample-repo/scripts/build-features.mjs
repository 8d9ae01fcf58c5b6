// Builds the model's feature tables from data/raw/deliveries.csv:
// data/train.csv and data/holdout.csv. The holdout is every parcel whose id hashes into the last
// fifth (FNV-1a), so adding a feature never moves a parcel between the two files.
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

const columns = ['parcel_id', ...Object.keys(features), 'late']
const train = [columns.join(',')]
const holdout = [columns.join(',')]
for (const r of records) {
  const line = [r.parcel_id, ...Object.values(features).map((f) => f(r)), r.late].join(',')
  ;(fnv1a(r.parcel_id) % 5 === 4 ? holdout : train).push(line)
}
mkdirSync('data', { recursive: true })
writeFileSync('data/train.csv', `${train.join('\n')}\n`)
writeFileSync('data/holdout.csv', `${holdout.join('\n')}\n`)
