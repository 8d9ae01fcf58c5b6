/**
 * Numbers for people, the same in the comment and the terminal. Locale-free on purpose (the
 * runner's locale must not change a comment), so grouping is always a comma and the point a dot.
 * NaN is a documented "undefined" everywhere in the report and prints as `n/a`.
 */

/** Drops trailing zeros after a decimal point: "0.01230" -> "0.0123", "100.0" -> "100". */
function trimZeros(fixed: string): string {
  return fixed.includes('.') ? fixed.replace(/0+$/, '').replace(/\.$/, '') : fixed
}

function exponential(value: number, digits: number): string {
  const [mantissa, exponent] = value.toExponential(digits).split('e')
  return `${trimZeros(mantissa)}e${exponent.replace('+', '')}`
}

/**
 * A measured value with 4 significant digits: `0.01234`, `12.5`, `1235` (no decimals from 1000 on),
 * `1.23e-5` below 1e-4, `1.235e6` from 1e6 on. Whole numbers print whole up to 1e15 (`20000`).
 * `n/a` for NaN, `inf` / `-inf` for infinities, `0` for both zeros.
 */
export function formatNumber(value: number): string {
  if (Number.isNaN(value)) return 'n/a'
  if (!Number.isFinite(value)) return value > 0 ? 'inf' : '-inf'
  if (value === 0) return '0'
  const size = Math.abs(value)
  if (Number.isInteger(value) && size < 1e15) return String(value)
  if (size < 1e-4 || size >= 1e6) return exponential(value, 3)
  if (size >= 1000) return value.toFixed(0)
  return trimZeros(value.toPrecision(4))
}

/**
 * A p-value with 2 significant digits: `0.0012`, `0.05`, `1`; `1.2e-4` below 0.001, `<1e-6` below
 * one in a million (the third digit of a tiny p-value means nothing). Values outside [0, 1] are
 * not p-values and print through `formatNumber`, so a bad input shows instead of hiding.
 */
export function formatPValue(p: number): string {
  if (Number.isNaN(p) || p < 0 || p > 1) return formatNumber(p)
  if (p < 1e-6) return '<1e-6'
  if (p < 1e-3) return exponential(p, 1)
  return trimZeros(p.toPrecision(2))
}

/** A count with thousands grouped: `5,000`, `-12,345`. Non-integers print through `formatNumber`. */
export function formatCount(count: number): string {
  if (!Number.isInteger(count)) return formatNumber(count)
  const digits = String(Math.abs(count))
  const grouped = digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',')
  return count < 0 ? `-${grouped}` : grouped
}

/**
 * A share in [0, 1] as a percentage with one decimal: 0.8123 -> `81.2%`; a positive share that would
 * round to zero is `<0.1%`, so it does not read as none. `n/a` for NaN.
 */
export function formatPercent(share: number): string {
  if (!Number.isFinite(share)) return formatNumber(share)
  if (share > 0 && share < 0.0005) return '<0.1%'
  const percent = trimZeros((share * 100).toFixed(1))
  return `${percent === '-0' ? '0' : percent}%`
}

/**
 * A change as a signed percentage of the value it started from: (to − from) / |from|, one decimal
 * under 10% and whole percents above: 0.0203 → 0.089 is `+338%`, 0.655 → 0.475 is `-27%`, no change
 * is `0%`. From zero there is no percentage: `n/a` (the caller should say "new" or give both values).
 */
export function formatChange(from: number, to: number): string {
  if (!Number.isFinite(from) || !Number.isFinite(to) || from === 0) return 'n/a'
  const change = (to - from) / Math.abs(from)
  if (change === 0) return '0%'
  const size = Math.abs(change * 100)
  const digits = size < 10 ? trimZeros(size.toFixed(1)) : size.toFixed(0)
  if (digits === '0') return change > 0 ? '+<0.1%' : '-<0.1%'
  return `${change > 0 ? '+' : '-'}${digits}%`
}

/** A ratio with a times sign: `3.2×`; `n/a` when undefined. */
export function formatRatio(ratio: number): string {
  return Number.isFinite(ratio) ? `${formatNumber(ratio)}×` : 'n/a'
}

/** "p = 0.012", or "p < 1e-6" for a p-value too small to print: a comparison that reads as one. */
export function formatPStatement(label: string, p: number): string {
  const text = formatPValue(p)
  return text.startsWith('<') ? `${label} < ${text.slice(1)}` : `${label} = ${text}`
}
