import { describe, expect, it } from 'vitest'
import { computeNoiseFloor } from '../../../src/core/importance/compute-noise-floor.ts'
import type { ImportanceEstimate } from '../../../src/core/importance/permutation-importance.ts'

/** One refit's estimate for a unit from its draws (only `draws` and `mean` are read by computeNoiseFloor). */
function estimate(name: string, draws: number[], group?: string[]): ImportanceEstimate {
  const mean = draws.reduce((s, v) => s + v, 0) / draws.length
  return { name, members: group ?? [name], isGroup: group !== undefined, draws, mean, sd: NaN, lower: NaN, upper: NaN }
}

describe('computeNoiseFloor(refits)', () => {
  it('gives mean ± t(0.975, R−1)·s/√R over the refit means: the worked one-sample interval for R = 5', () => {
    // One-sample 95% t interval of [0.10, 0.12, 0.08, 0.11, 0.09], computed with SciPy 1.10.1: half-width
    // 0.0196324316 (s = 0.0158113883, t.ppf(0.975, 4) = 2.7764451052; NIST/SEMATECH e-Handbook §1.3.6.7.2
    // gives 2.776445). Each refit has two draws at its mean ± 0.01.
    const means = [0.1, 0.12, 0.08, 0.11, 0.09]
    const refits = means.map((m) => [estimate('distance_km', [m - 0.01, m + 0.01])])
    const [unit] = computeNoiseFloor(refits)
    expect(unit.mean).toBeCloseTo(0.1, 12)
    expect(unit.refitSd).toBeCloseTo(0.0158113883, 10)
    expect(unit.upper - unit.mean).toBeCloseTo(0.0196324316, 10)
    expect(unit.mean - unit.lower).toBeCloseTo(0.0196324316, 10)
    // By hand: every refit's draws are ±0.01 around their mean, so the pooled draw SD (ddof 1 per refit)
    // is sqrt(5 · 0.0002 / 5) = 0.0141421356.
    expect(unit.drawSd).toBeCloseTo(0.0141421356, 10)
    expect(unit.isAboveFloor).toBe(true)
    expect(unit.perRefit).toEqual(means.map((m) => (m - 0.01 + (m + 0.01)) / 2))
  })

  it('uses t with R − 1 degrees of freedom and the requested level: R = 11 gives half-width t(0.975, 10), or t(0.995, 10) at 0.99', () => {
    // Refit means 0, 1, ..., 10: sample variance 11, so s/√R = 1 and the half-width is t itself.
    // t(0.975, 10) = 2.228139 and t(0.995, 10) = 3.169273 (NIST/SEMATECH e-Handbook §1.3.6.7.2).
    const refits = Array.from({ length: 11 }, (_, r) => [estimate('stop_count', [r])])
    const [at95] = computeNoiseFloor(refits)
    expect(at95.mean).toBe(5)
    expect(at95.refitSd).toBeCloseTo(Math.sqrt(11), 12)
    expect(at95.upper - at95.mean).toBeCloseTo(2.228139, 6)
    expect(at95.lower).toBeCloseTo(5 - 2.228139, 6)
    // One draw per refit: the pooled draw SD is undefined.
    expect(at95.drawSd).toBeNaN()
    const [at99] = computeNoiseFloor(refits, { level: 0.99 })
    expect(at99.upper - at99.mean).toBeCloseTo(3.169273, 6)
  })

  it('pools the draw SD over refits with unequal numbers of draws, and uses t(0.975, 1) for two refits', () => {
    // By hand: draws [1, 2, 3] (SS 2, 2 df) and [5, 9] (SS 8, 1 df): pooled SD sqrt(10 / 3).
    // Refit means 2 and 7: mean 4.5, s = sqrt(12.5). With one degree of freedom T is Cauchy, so
    // t(0.975, 1) = tan(0.475 π) = 12.7062047 (derived), and the half-width is that · s/√2 = 31.7655118.
    const [unit] = computeNoiseFloor([[estimate('rain_forecast_mm', [1, 2, 3])], [estimate('rain_forecast_mm', [5, 9])]])
    expect(unit.drawSd).toBeCloseTo(Math.sqrt(10 / 3), 12)
    expect(unit.mean).toBe(4.5)
    expect(unit.refitSd).toBeCloseTo(Math.sqrt(12.5), 12)
    expect(unit.upper - unit.mean).toBeCloseTo(Math.tan(0.475 * Math.PI) * Math.sqrt(12.5 / 2), 6)
    expect(unit.upper - unit.mean).toBeCloseTo(31.7655118, 6)
    expect(unit.isAboveFloor).toBe(false)
  })

  it('falls back to the draws’ own t-interval with one refit (a loaded model), leaving the refit SD undefined', () => {
    // The same worked interval (computed with SciPy 1.10.1, above), now as five draws of one refit.
    const [unit] = computeNoiseFloor([[estimate('depot', [0.1, 0.12, 0.08, 0.11, 0.09])]])
    expect(unit.refitSd).toBeNaN()
    expect(unit.drawSd).toBeCloseTo(0.0158113883, 10)
    expect(unit.mean).toBeCloseTo(0.1, 12)
    expect(unit.upper - unit.mean).toBeCloseTo(0.0196324316, 10)
    expect(unit.lower).toBeCloseTo(0.1 - 0.0196324316, 10)
    expect(unit.isAboveFloor).toBe(true)
  })

  it('gives NaN bounds and no floor decision with one refit of one draw', () => {
    const [unit] = computeNoiseFloor([[estimate('depot', [0.4])]])
    expect(unit.mean).toBe(0.4)
    expect([unit.refitSd, unit.drawSd, unit.lower, unit.upper].every(Number.isNaN)).toBe(true)
    expect(unit.isAboveFloor).toBe(false)
  })

  it('gives a constant column zero everywhere and calls it indistinguishable from zero', () => {
    // A column with one value cannot change a prediction when permuted: every draw is exactly 0.
    for (const refitCount of [1, 3]) {
      const refits = Array.from({ length: refitCount }, () => [estimate('depot_code', [0, 0, 0]), estimate('distance_km', [0.2, 0.3, 0.25])])
      const [constant] = computeNoiseFloor(refits)
      expect([constant.mean, constant.drawSd, constant.lower, constant.upper]).toEqual([0, 0, 0, 0])
      expect(constant.refitSd).toEqual(refitCount === 1 ? NaN : 0)
      expect(constant.isAboveFloor).toBe(false)
    }
  })

  it('keeps names, members and the group flag, in the order of the first refit', () => {
    const refit = () => [estimate('distance_km', [1, 2]), estimate('route', [3, 4], ['distance_km', 'stop_count'])]
    const units = computeNoiseFloor([refit(), refit()])
    expect(units.map((u) => [u.name, u.members, u.isGroup])).toEqual([
      ['distance_km', ['distance_km'], false],
      ['route', ['distance_km', 'stop_count'], true],
    ])
    // Identical refits: no refit spread at all, so the interval collapses onto the mean.
    expect([units[1].mean, units[1].refitSd, units[1].lower, units[1].upper]).toEqual([3.5, 0, 3.5, 3.5])
  })

  it('refuses no refits, or refits whose units differ, with a RangeError naming itself', () => {
    expect(() => computeNoiseFloor([])).toThrow(new RangeError('computeNoiseFloor needs at least one refit'))
    expect(() => computeNoiseFloor([[estimate('a', [1])], [estimate('b', [1])]])).toThrow(
      new RangeError('computeNoiseFloor needs the same features in the same order in every refit'),
    )
    expect(() => computeNoiseFloor([[estimate('a', [1])], [estimate('a', [1]), estimate('b', [1])]])).toThrow(RangeError)
  })
})
