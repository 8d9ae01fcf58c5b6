import { describe, expect, it } from 'vitest'

import { formatChange, formatCount, formatNumber, formatPercent, formatPStatement, formatPValue } from '../../../src/core/report/format-number.ts'

describe('formatNumber(value)', () => {
  it("prints 4 significant digits like C's %.4g between 1e-4 and 1000", () => {
    // Expected strings from Python 3 '%.4g' % x (/usr/bin/python3, C printf rounding).
    const cases: [number, string][] = [
      [0.012345, '0.01235'],
      [0.06116, '0.06116'],
      [0.0046, '0.0046'],
      [0.000495, '0.000495'],
      [0.00012345, '0.0001234'],
      [12.5, '12.5'],
      [123.456, '123.5'],
      [999.96, '1000'],
      [0.99996, '1'],
      [-0.0013072, '-0.001307'],
    ]
    for (const [value, expected] of cases) expect(formatNumber(value)).toBe(expected)
  })

  it('uses a short exponent below 1e-4 and from 1e6, and no decimals from 1000 on', () => {
    // Mantissas from Python 3 '%.3e' % x, trailing zeros and the '+' dropped.
    expect(formatNumber(1.23e-5)).toBe('1.23e-5')
    expect(formatNumber(-4.56e-5)).toBe('-4.56e-5')
    expect(formatNumber(1234567.8)).toBe('1.235e6')
    expect(formatNumber(1234.56)).toBe('1235')
  })

  it('prints whole numbers whole, zero as 0, and names NaN and the infinities', () => {
    expect(formatNumber(20000)).toBe('20000')
    expect(formatNumber(-3)).toBe('-3')
    expect(formatNumber(-0)).toBe('0')
    expect(formatNumber(NaN)).toBe('n/a')
    expect(formatNumber(Infinity)).toBe('inf')
    expect(formatNumber(-Infinity)).toBe('-inf')
  })
})

describe('formatPValue(p)', () => {
  it("prints 2 significant digits like %.2g, an exponent below 0.001 and <1e-6 below that", () => {
    // Python 3: '%.2g' % 0.0012 -> 0.0012, '%.2g' % 0.05 -> 0.05, '%.1e' % 0.00012345 -> 1.2e-04.
    expect(formatPValue(0.0012)).toBe('0.0012')
    expect(formatPValue(0.05)).toBe('0.05')
    expect(formatPValue(0.012345)).toBe('0.012')
    expect(formatPValue(1)).toBe('1')
    expect(formatPValue(0.001)).toBe('0.001')
    expect(formatPValue(0.00012345)).toBe('1.2e-4')
    expect(formatPValue(1e-6)).toBe('1e-6')
    expect(formatPValue(9.99e-7)).toBe('<1e-6')
    expect(formatPValue(2.5e-8)).toBe('<1e-6')
  })

  it('shows values that are not p-values instead of hiding them', () => {
    expect(formatPValue(NaN)).toBe('n/a')
    expect(formatPValue(1.5)).toBe('1.5')
    expect(formatPValue(-0.1)).toBe('-0.1')
  })
})

describe('formatCount(count)', () => {
  it('groups thousands with commas whatever the locale', () => {
    expect(formatCount(0)).toBe('0')
    expect(formatCount(999)).toBe('999')
    expect(formatCount(5000)).toBe('5,000')
    expect(formatCount(1234567)).toBe('1,234,567')
    expect(formatCount(-12345)).toBe('-12,345')
    expect(formatCount(2.5)).toBe('2.5')
  })
})

describe('formatPercent(share)', () => {
  it('prints a share as a percentage with one decimal', () => {
    expect(formatPercent(0.68138)).toBe('68.1%')
    expect(formatPercent(0.5)).toBe('50%')
    expect(formatPercent(0.0099)).toBe('1%')
    expect(formatPercent(-0.0001)).toBe('0%')
    expect(formatPercent(0.0002)).toBe('<0.1%')
    expect(formatPercent(0.0005)).toBe('0.1%')
    expect(formatPercent(0)).toBe('0%')
    expect(formatPercent(NaN)).toBe('n/a')
  })
})

describe('formatChange(from, to) and formatPStatement(label, p)', () => {
  it('gives the change against the base value, signed', () => {
    // The example: 0.0203 → 0.089 is (0.089 − 0.0203) / 0.0203 = +338.4%, not 77%.
    expect(formatChange(0.0203, 0.089)).toBe('+338%')
    expect(formatChange(0.655, 0.475)).toBe('-27%')
    expect(formatChange(2, 2.1)).toBe('+5%')
    expect(formatChange(-0.5, 0.5)).toBe('+200%')
    expect(formatChange(1, 1)).toBe('0%')
    expect(formatChange(0, 1)).toBe('n/a')
  })
  it('reads a tiny p-value as a comparison', () => {
    expect(formatPStatement('p', 0.0123)).toBe('p = 0.012')
    expect(formatPStatement('p', 1e-9)).toBe('p < 1e-6')
  })
})
