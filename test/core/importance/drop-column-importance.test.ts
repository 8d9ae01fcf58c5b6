import { describe, expect, it } from 'vitest'
import { dropColumnImportance } from '../../../src/core/importance/drop-column-importance.ts'

// Reference: SciPy 1.10.1 (Debian python3-scipy, /usr/bin/python3):
//   stats.ttest_rel(drop, full, alternative='greater') -> statistic 19.60025773026426, pvalue 1.997905656372302e-05
//   stats.t.interval(0.95, 4, loc=d.mean(), scale=d.std(ddof=1)/sqrt(5)) -> (0.04686571890890357, 0.06233428109109646)
//   full.std(ddof=1) -> 0.005263078946776294
const full = [0.412, 0.405, 0.419, 0.409, 0.414]
const dropped = [0.471, 0.452, 0.48, 0.466, 0.463]

describe('dropColumnImportance(fullLosses, droppedLosses)', () => {
  it('gives the paired t-test, interval and reseed SD of SciPy 1.10.1', () => {
    const d = dropColumnImportance(full, dropped)
    expect(d.mean).toBeCloseTo(0.0546, 12)
    expect(d.pairedT).toBeCloseTo(19.60025773026426, 9)
    expect(d.pValue).toBeCloseTo(1.997905656372302e-5, 9)
    expect(d.lower).toBeCloseTo(0.04686571890890357, 10)
    expect(d.upper).toBeCloseTo(0.06233428109109646, 10)
    expect(d.reseedSd).toBeCloseTo(0.005263078946776294, 12)
    expect(d.isAboveNoise).toBe(true)
  })

  it('calls a loss no larger than one reseed SD noise, even when every pair agrees on its sign', () => {
    const small = full.map((v, r) => v + 0.004 + r * 1e-4)
    const d = dropColumnImportance(full, small)
    expect(d.lower).toBeGreaterThan(0)
    expect(d.isAboveNoise).toBe(false)
  })

  it('says nothing about noise with one refit and refuses unmatched refits', () => {
    const one = dropColumnImportance([0.4], [0.5])
    expect(one.mean).toBeCloseTo(0.1, 12)
    expect(one.pValue).toBeNaN()
    expect(one.isAboveNoise).toBe(false)
    expect(() => dropColumnImportance([0.4, 0.5], [0.4])).toThrow(/matched refits/)
  })
})
