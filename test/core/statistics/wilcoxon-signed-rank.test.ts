import { describe, expect, it } from 'vitest'
import { wilcoxonSignedRank } from '../../../src/core/statistics/wilcoxon-signed-rank.ts'

// One-sided sign test / Wilcoxon signed-rank example, computed with SciPy 1.10.1 scipy.stats.wilcoxon
// (the paired test used for LOCO by Lei et al. 2018).
const deltas = [0.5, 1.2, -0.3, 0.8, 2.1, 0.9, -0.1, 1.5]

// sin(1.7 i) + 0.25 rounded to 4 decimals, i = 1..60: no zeros, no tied absolute values.
const sixty = [
  1.2417, -0.0055, -0.6758, 0.7441, 1.0485, -0.4499, -0.3681, 1.1092, 0.6467, -0.7114, 0.101, 1.2498, 0.1414, -0.7218,
  0.6091, 1.1293, -0.3356, -0.4784, 1.0233, 0.7791, -0.6597, -0.0447, 1.2356, 0.2907, -0.7461, 0.466, 1.1904, -0.2083,
  -0.5723, 0.9202, 0.8996, -0.5876, -0.1838, 1.1994, 0.4391, -0.7481, 0.3181, 1.2306, -0.0708, -0.6479, 0.8022, 1.0056,
  -0.4969, -0.3132, 1.142, 0.5833, -0.7279, 0.1687, 1.2489, 0.0739, -0.7035, 0.6718, 1.0948, -0.3895, -0.43, 1.0647,
  0.7201, -0.6858, 0.0211, 1.2448,
]

// cos(2.3 i) − 0.15 rounded to 4 decimals, i = 1..50: no zeros, no tied absolute values.
const fifty = [
  -0.8163, -0.2622, 0.6657, -1.1248, 0.3333, 0.1808, -1.0741, 0.7506, -0.426, -0.6828, 0.836, -0.9311, -0.0952, 0.558,
  -1.1483, 0.4723, 0.0191, -0.9976, 0.8104, -0.5822, -0.5345, 0.7946, -1.0242, 0.0703, 0.4306, -1.144, 0.5939, -0.1474,
  -0.8975, 0.8434, -0.7263, -0.3755, 0.7267, -1.0928, 0.2296, 0.287, -1.1119, 0.6948, -0.3139, -0.7764, 0.8486, -0.8543,
  -0.2101, 0.6344, -1.1351, 0.3783, 0.1311, -1.0529, 0.7721, -0.4758,
]

describe('wilcoxonSignedRank(differences, {alternative})', () => {
  it('gives the exact one-sided p-value of the check values', () => {
    // p = 0.01953125 (= 5/256), computed with SciPy 1.10.1 wilcoxon(Δ, alternative='greater'),
    // with statistic W+ = 33. By hand: W+ >= 33 means the negative ranks sum to <= 3,
    // {}, {1}, {2}, {3}, {1,2}: 5 of 2^8 sign patterns.
    const result = wilcoxonSignedRank(deltas, { alternative: 'greater' })
    expect(result).toEqual({ statistic: 33, pValue: 0.01953125, exact: true })
  })
  it('gives the exact lower and two-sided p-values', () => {
    // Computed with SciPy 1.10.1: alternative='less' 0.98828125, 'two-sided' 0.0390625.
    expect(wilcoxonSignedRank(deltas, { alternative: 'less' }).pValue).toBe(0.98828125)
    expect(wilcoxonSignedRank(deltas, { alternative: 'two-sided' }).pValue).toBe(0.0390625)
  })
  it('counts the exact null distribution up to n = 50', () => {
    // Computed with SciPy 1.10.1: wilcoxon(fifty, mode='exact'), statistic 465 for 'greater'.
    expect(wilcoxonSignedRank(fifty, { alternative: 'greater' })).toEqual({
      statistic: 465,
      pValue: expect.closeTo(0.9524333303163957, 14),
      exact: true,
    })
    expect(wilcoxonSignedRank(fifty, { alternative: 'less' }).pValue).toBeCloseTo(0.04854692483919809, 15)
    expect(wilcoxonSignedRank(fifty, { alternative: 'two-sided' }).pValue).toBeCloseTo(0.09709384967839618, 15)
  })
  // Computed with SciPy 1.10.1: wilcoxon(d, zero_method='wilcox', correction=True, mode='approx');
  // `statistic` is its statistic for alternative='greater' (W+).
  const approximated = [
    {
      name: 'uses the normal approximation with continuity correction above n = 50',
      differences: sixty,
      statistic: 1280,
      pValues: { greater: 0.0036449313800394592, less: 0.9964345214924257, 'two-sided': 0.0072898627600789185 },
    },
    {
      name: 'drops zeros and corrects the variance for ties',
      differences: [1.5, -0.5, 2.0, 2.0, 0, 3.1, -1.5, 0.7, 1.5, 2.6, -0.2, 4.0, 0],
      statistic: 58,
      pValues: { greater: 0.014491527203769419, less: 0.988482336598211, 'two-sided': 0.028983054407538837 },
    },
  ] as const
  for (const { name, differences, statistic, pValues } of approximated) {
    it(name, () => {
      for (const alternative of ['greater', 'less', 'two-sided'] as const) {
        const result = wilcoxonSignedRank(differences, { alternative })
        expect(result.statistic).toBe(statistic)
        expect(result.exact).toBe(false)
        expect(result.pValue).toBeCloseTo(pValues[alternative], 14)
      }
    })
  }
  it('gives p = 1/2^n when every difference is positive', () => {
    // By hand: only the all-positive sign pattern reaches W+ = 6 for n = 3.
    expect(wilcoxonSignedRank([0.2, 1, 3], { alternative: 'greater' }).pValue).toBe(0.125)
  })
  it('returns p = 1 when every difference is zero', () => {
    expect(wilcoxonSignedRank([0, 0, 0], { alternative: 'two-sided' })).toEqual({ statistic: 0, pValue: 1, exact: true })
  })
  it('refuses NaN and unknown alternatives', () => {
    expect(() => wilcoxonSignedRank([1, NaN], { alternative: 'greater' })).toThrow(
      new RangeError('wilcoxonSignedRank cannot use NaN (difference 1); drop missing pairs first'),
    )
    const options = { alternative: 'more' } as unknown as { alternative: 'greater' }
    expect(() => wilcoxonSignedRank([1], options)).toThrow(
      new RangeError("wilcoxonSignedRank needs alternative 'greater', 'less' or 'two-sided', got 'more'"),
    )
  })
})
