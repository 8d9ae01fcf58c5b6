// Writes data/raw/deliveries.csv: invented parcels of the fictional courier Northwind Parcel.
// Seeded (mulberry32), so every run writes the same rows.
import { mkdirSync, writeFileSync } from 'node:fs'

const ROWS = 6000
let state = 20261201
function random() {
  state = (state + 0x6d2b79f5) | 0
  let t = Math.imul(state ^ (state >>> 15), 1 | state)
  t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296
}
const normal = () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random())
const pick = (items) => items[Math.floor(random() * items.length)]

const depots = { harbour: 0.5, 'old-town': 0.3, airport: -0.2, ringway: 0, 'north-park': -0.4 }
const shifts = { early: -0.3, day: 0, late: 0.5 }
const header = [
  'parcel_id', 'depot', 'distance_km', 'stop_count', 'promised_window_h', 'driver_shift',
  'rain_forecast_mm', 'parcel_weight_kg', 'roadworks_km', 'final_scan_hour', 'promised_by_hour', 'late',
]
const lines = [header.join(',')]
for (let i = 0; i < ROWS; i++) {
  const depot = pick(Object.keys(depots))
  const shift = pick(Object.keys(shifts))
  const distance = Math.exp(2.2 + 0.6 * normal())
  const stops = Math.max(1, Math.round(14 + 6 * normal()))
  const window = pick([2, 4, 8])
  const rain = Math.max(0, 3 * normal() + 1)
  const weight = Math.max(0.2, Math.exp(0.8 + 0.9 * normal()))
  const roadworks = random() < 0.35 ? Math.round(random() * 60) / 10 : 0
  const logit =
    -1.6 + 0.035 * distance + 0.05 * (stops - 14) - 0.22 * (window - 4) + depots[depot] + shifts[shift] +
    0.12 * rain + 0.03 * weight + 0.55 * roadworks
  const late = random() < 1 / (1 + Math.exp(-logit)) ? 1 : 0
  const promisedBy = 9 + window + pick([0, 2, 4])
  // Known only after delivery: the final scan comes after the promise exactly when the parcel was late.
  const finalScan = promisedBy + (late ? 0.3 + 2.5 * random() : -(0.2 + 3 * random()))
  lines.push([
    `P${String(100000 + i)}`, depot, distance.toFixed(2), stops, window, shift, rain.toFixed(1),
    weight.toFixed(2), roadworks.toFixed(1), finalScan.toFixed(2), promisedBy, late,
  ].join(','))
}
mkdirSync('data/raw', { recursive: true })
writeFileSync('data/raw/deliveries.csv', `${lines.join('\n')}\n`)
