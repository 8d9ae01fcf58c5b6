import { describe, expect, it } from 'vitest'
import { createRandom, deriveSeed, shuffledIndices } from '../../../src/core/statistics/random.ts'

const draws = (seed: number, count: number): number[] => {
  const random = createRandom(seed)
  return Array.from({ length: count }, () => random.next())
}

describe('createRandom(seed)', () => {
  it('repeats its sequence for the same seed and changes it for another', () => {
    expect(draws(42, 50)).toEqual(draws(42, 50))
    expect(draws(42, 50)).not.toEqual(draws(43, 50))
    // Seeds are reduced modulo 2^32, as documented.
    expect(draws(2 ** 32 + 42, 5)).toEqual(draws(42, 5))
    expect(createRandom(2 ** 32 + 42).seed).toBe(42)
  })
  it('keeps next() in [0, 1) with mean near 1/2', () => {
    const values = draws(7, 20_000)
    expect(values.every((v) => v >= 0 && v < 1)).toBe(true)
    // The mean of 20 000 uniforms has SD sqrt(1/12 / 20 000) = 0.00204; allow 5 SD.
    const mean = values.reduce((sum, v) => sum + v, 0) / values.length
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * 0.00204)
  })
  it('draws int(6) uniformly', () => {
    // Chi-square goodness of fit over 60 000 draws, 5 degrees of freedom: the 0.999 quantile
    // is 20.515005652432873 (computed with SciPy 1.10.1, chi2.ppf(0.999, 5)).
    const random = createRandom(2024)
    const counts = new Array(6).fill(0)
    for (let i = 0; i < 60_000; i++) counts[random.int(6)]++
    const chiSquare = counts.reduce((sum, c) => sum + (c - 10_000) ** 2 / 10_000, 0)
    expect(chiSquare).toBeLessThan(20.515005652432873)
  })
  it('rejects the short final range, so int(n) stays unbiased when n does not divide 2^32', () => {
    // n = 3 · 2^30: a plain `uint32 % n` would map [n, 2^32) onto [0, 2^30) and put half of all
    // draws below 2^30 instead of a third. 30 000 draws: SD of the fraction is 0.0027; allow 5 SD.
    const n = 3 * 2 ** 30
    const random = createRandom(99)
    let low = 0
    for (let i = 0; i < 30_000; i++) if (random.int(n) < 2 ** 30) low++
    expect(Math.abs(low / 30_000 - 1 / 3)).toBeLessThan(5 * 0.0027)
  })
  it('refuses int(n) for n that is not a whole number from 1 to 2^32', () => {
    const random = createRandom(1)
    expect(() => random.int(0)).toThrow(new RangeError('int needs a whole number from 1 to 2^32, got 0'))
    expect(() => random.int(2.5)).toThrow(RangeError)
  })
  it('draws normal() with mean near 0 and variance near 1', () => {
    // 20 000 draws: SD of the mean 0.0071, of the variance about sqrt(2 / 20 000) = 0.01; allow 5 SD.
    const random = createRandom(5)
    const values = Array.from({ length: 20_000 }, () => random.normal())
    const mean = values.reduce((sum, v) => sum + v, 0) / values.length
    const variance = values.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (values.length - 1)
    expect(Math.abs(mean)).toBeLessThan(5 * 0.0071)
    expect(Math.abs(variance - 1)).toBeLessThan(5 * 0.01)
  })
})

describe('deriveSeed(seed, ...labels)', () => {
  it('is a deterministic uint32', () => {
    const seed = deriveSeed(7, 'base', 'refit', 2)
    expect(deriveSeed(7, 'base', 'refit', 2)).toBe(seed)
    expect(Number.isInteger(seed) && seed >= 0 && seed < 2 ** 32).toBe(true)
  })
  it('differs across labels, their order and the parent seed', () => {
    const labels: Array<Array<string | number>> = [
      ['base', 'refit', 0],
      ['base', 'refit', 1],
      ['candidate', 'refit', 0],
      ['refit', 'base', 0],
      ['base', 'refit0'],
      ['baserefit', 0],
      [],
    ]
    const seeds = labels.map((list) => deriveSeed(7, ...list))
    expect(new Set(seeds).size).toBe(labels.length)
    expect(deriveSeed(8, 'base', 'refit', 0)).not.toBe(seeds[0])
    const many = new Set(Array.from({ length: 1000 }, (_, i) => deriveSeed(7, 'draw', i)))
    expect(many.size).toBe(1000)
  })
})

describe('shuffledIndices(n, random)', () => {
  it('returns a permutation of 0..n-1, the same for the same seed', () => {
    const order = shuffledIndices(100, createRandom(3))
    expect(Array.from(order).sort((a, b) => a - b)).toEqual(Array.from({ length: 100 }, (_, i) => i))
    expect(Array.from(shuffledIndices(100, createRandom(3)))).toEqual(Array.from(order))
  })
})
