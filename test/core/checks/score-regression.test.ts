import { describe, expect, it } from 'vitest'
import { checkScoreRegression, type ScoreRegressionOptions } from '../../../src/core/checks/score-regression.ts'
import { metricByName } from '../../../src/core/metrics/metric-by-name.ts'
import { pairedBootstrap } from '../../../src/core/statistics/paired-bootstrap.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

// Policy defaults (src/core/config.ts defaultChecks.score) for an AUC policy.
const auc: ScoreRegressionOptions = { action: 'block', metric: 'auc', higherIsBetter: true, tolerance: 0, alpha: 0.05 }
const base = [0.8, 0.81, 0.79, 0.8, 0.8]
const worse = [0.7, 0.71, 0.69, 0.7, 0.7]

describe('checkScoreRegression(evidence, options)', () => {
  it('blocks a worsening beyond tolerance that is significant over reseeded refits, in these words', () => {
    const findings = checkScoreRegression({ baseScores: base, headScores: worse }, auc)
    // By hand: both sides have s² = 0.0002 / 4 = 5e-5, so se = sqrt(2 · 5e-5 / 5) = 0.004472136 and
    // Welch df = 8; one-sided p = P(T_8 > 0.1 / 0.004472136) = 8.462279632556085e-09
    // (scipy.stats.t.sf, SciPy 1.10.1).
    expect(findings).toHaveLength(1)
    expect(findings[0]).toMatchObject({
      kind: 'score-regression',
      severity: 'block',
      title: 'Holdout auc got worse: 0.8 → 0.7 (-13%, beyond reseed noise).',
      message:
        "The candidate's mean holdout auc is 0.7 against 0.8 for the baseline (higher is better). The worsening of 0.1 exceeds the tolerance of 0 " +
        'with one-sided p < 1e-6 (standard error 0.004472, Welch df 8 over reseeded refits; level 0.05).',
      evidence: { tolerance: 0, alpha: 0.05 },
    })
    const e = findings[0].evidence as Record<string, number>
    expect(e.worsening).toBeCloseTo(0.1, 12)
    expect(e.standardError).toBeCloseTo(0.004472135954999583, 12)
    expect(e.welchDf).toBeCloseTo(8, 9)
    expect(e.pValue / 8.462279632556085e-9).toBeCloseTo(1, 4)
  })

  it('finds nothing for a change within reseed noise, an improvement, or a worsening inside the tolerance', () => {
    // By hand: a 0.0067 drop against refit SDs of 0.02 and 0.0125: t = 0.48, far from significant.
    expect(checkScoreRegression({ baseScores: [0.8, 0.82, 0.78], headScores: [0.795, 0.815, 0.79] }, auc)).toEqual([])
    expect(checkScoreRegression({ baseScores: worse, headScores: base }, auc)).toEqual([])
    // A worsening of 0.1 with tolerance 0.2 does not count at all.
    expect(checkScoreRegression({ baseScores: base, headScores: worse }, { ...auc, tolerance: 0.2 })).toEqual([])
    // Tolerance 0.09: 0.01 beyond it, se 0.00447, t = 2.24 with 8 df: p = 0.028 < 0.05, still blocked.
    expect(checkScoreRegression({ baseScores: base, headScores: worse }, { ...auc, tolerance: 0.09 })).toHaveLength(1)
    expect(checkScoreRegression({ baseScores: base, headScores: worse }, { ...auc, action: 'off' })).toEqual([])
  })

  it('reads a rise as worse for a lower-is-better metric and uses the policy action', () => {
    const [finding] = checkScoreRegression(
      { baseScores: [0.4, 0.41, 0.39], headScores: [0.5, 0.51, 0.49] },
      { ...auc, metric: 'log-loss', higherIsBetter: false, action: 'warn' },
    )
    expect(finding.severity).toBe('warn')
    expect(finding.title).toBe('Holdout log-loss got worse: 0.4 → 0.5 (+25%, beyond reseed noise).')
    expect(finding.message).toContain('(lower is better)')
  })

  it('uses the paired bootstrap standard error and a normal tail with one refit per side', () => {
    // Replicates with mean −0.05 and SD 0.01 exactly: z = 0.05 / 0.01 = 5, one-sided p =
    // 2.866515718791933e-07 (scipy.stats.norm.sf(5), SciPy 1.10.1).
    const replicates = [-0.05, -0.04, -0.06, -0.05, -0.05, -0.05]
    const sd = Math.sqrt(replicates.reduce((s, v) => s + (v + 0.05) ** 2, 0) / (replicates.length - 1))
    const scaled = replicates.map((v) => -0.05 + ((v + 0.05) * 0.01) / sd)
    const [finding] = checkScoreRegression({ baseScores: [0.8], headScores: [0.75], pairedBootstrap: scaled }, auc)
    expect(finding.message).toBe(
      "The candidate's mean holdout auc is 0.75 against 0.8 for the baseline (higher is better). The worsening of 0.05 exceeds the tolerance of 0 " +
        'with one-sided p < 1e-6 (standard error 0.01, from a paired bootstrap of holdout rows; level 0.05).',
    )
    expect(finding.evidence.welchDf).toBeNull()
    expect((finding.evidence.pValue as number) / 2.866515718791933e-7).toBeCloseTo(1, 4)
  })

  it('judges pairedBootstrap replicates of real predictions: identical or slightly jittered predictions are noise, a broken head blocks', () => {
    const random = createRandom(3)
    const n = 200
    const clip = (v: number) => Math.min(0.99, Math.max(0.01, v))
    const y = Float64Array.from({ length: n }, (_, i) => i % 2)
    const p = Float64Array.from({ length: n }, (_, i) => clip(0.5 + (y[i] ? 0.1 : -0.1) + 0.25 * random.normal()))
    const metric = metricByName('auc', 'binary')
    const judge = (head: Float64Array) =>
      checkScoreRegression(
        { baseScores: [metric.compute(y, p)], headScores: [metric.compute(y, head)], pairedBootstrap: pairedBootstrap(y, p, head, { metric, replicates: 200, seed: 7 }) },
        auc,
      )
    // The same predictions: every replicate is exactly 0, so nothing can be worse.
    expect(pairedBootstrap(y, p, p, { metric, replicates: 50, seed: 7 }).every((v) => v === 0)).toBe(true)
    expect(judge(p)).toEqual([])
    // A little jitter: the head's AUC is lower (0.69355 against 0.6941) but the paired bootstrap SE is
    // about 0.008, so z is under 0.1: noise.
    const jittered = p.map((v) => clip(v + 0.05 * random.normal()))
    expect(metric.compute(y, jittered)).toBeLessThan(metric.compute(y, p))
    expect(judge(jittered)).toEqual([])
    // Scores reversed on the first 80 rows: AUC falls by far more than the row-sampling spread.
    const broken = p.map((v, i) => (i < 80 ? 1 - v : v))
    expect(judge(broken).map((f) => f.kind)).toEqual(['score-regression'])
  })

  it('decides by the sign alone when there is no spread at all', () => {
    // Zero SD on both sides: the Welch standard error is 0, so any worsening beyond tolerance is exact (p = 0).
    const [finding] = checkScoreRegression({ baseScores: [0.8, 0.8], headScores: [0.7, 0.7] }, auc)
    expect(finding.evidence.pValue).toBe(0)
    expect(checkScoreRegression({ baseScores: [0.8], headScores: [0.8] }, auc)).toEqual([])
  })
})

describe('checkScoreRegression: the reseed-SD line between warn and block, and the edges of each rule', () => {
  // Welch values by hand from Welch (1947): se = sqrt(s1²/n1 + s2²/n2), df by Welch–Satterthwaite;
  // the one-sided p from scipy.stats.t.sf (SciPy 1.10.1). The pooled reseed SD is
  // sqrt((s1² + s2²) / 2), the score check's own definition (common practice for a difference in SDs).
  const wide = [0.8, 0.82, 0.78] // mean 0.8, s² = 0.0004
  const narrow = [0.7, 0.71, 0.69] // mean 0.7, s² = 0.0001

  it('measures the worsening in pooled reseed SDs and blocks only from blockAtSds of them on', () => {
    // Pooled SD sqrt((0.0004 + 0.0001) / 2) = 0.015811388300841875, so 0.1 is 6.324555320336759 SDs.
    const [atDefault] = checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, blockAtSds: 3 })
    expect(atDefault.severity).toBe('block')
    expect(atDefault.evidence.worseningInReseedSds as number).toBeCloseTo(6.324555320336759, 12)
    // se = sqrt(0.0004/3 + 0.0001/3) = 0.012909944487358039, df = 2.9411764705882404,
    // t = 7.745966692414869, p = 0.002398999849563981 (scipy.stats.t.sf, SciPy 1.10.1).
    expect(atDefault.evidence.standardError as number).toBeCloseTo(0.012909944487358039, 14)
    expect(atDefault.evidence.welchDf as number).toBeCloseTo(2.9411764705882404, 12)
    expect((atDefault.evidence.pValue as number) / 0.002398999849563981).toBeCloseTo(1, 6)
    expect(atDefault.message).toContain('with one-sided p = 0.0024 (standard error 0.01291, Welch df 2.941 over reseeded refits; level 0.05).')
    // 6.32 SDs is under a line of 6.5: significant, but only a warning; at 6.3 it blocks.
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, blockAtSds: 6.5 })[0].severity).toBe('warn')
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, blockAtSds: 6.3 })[0].severity).toBe('block')
    // A warn policy stays a warning whatever the line; without a line a significant worsening blocks.
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, action: 'warn', blockAtSds: 1 })[0].severity).toBe('warn')
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow }, auc)[0].severity).toBe('block')
  })

  it('takes the tolerance off the worsening before the test', () => {
    // Tolerance 0.08: t = (0.1 − 0.08) / 0.012909944487358039 = 1.5491933384829928 with df 2.941,
    // p = 0.11044042024704483 (scipy.stats.t.sf, SciPy 1.10.1): not significant at 0.05, but it is at 0.2.
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, tolerance: 0.08 })).toEqual([])
    const [finding] = checkScoreRegression({ baseScores: wide, headScores: narrow }, { ...auc, tolerance: 0.08, alpha: 0.2 })
    expect((finding.evidence.pValue as number) / 0.11044042024704483).toBeCloseTo(1, 6)
    expect(finding.message).toContain('The worsening of 0.1 exceeds the tolerance of 0.08 with one-sided p = 0.11')
  })

  it('runs the Welch test from two refits per side', () => {
    // n = 2 each, s² = 0.0002: se = 0.014142135623730925, df = 2, t = 7.071067811865494,
    // p = 0.009709662154539863 (scipy.stats.ttest_ind(equal_var=False, alternative='greater'), SciPy 1.10.1).
    const [finding] = checkScoreRegression({ baseScores: [0.8, 0.82], headScores: [0.7, 0.72] }, auc)
    expect(finding.evidence.welchDf as number).toBeCloseTo(2, 12)
    expect(finding.evidence.standardError as number).toBeCloseTo(0.014142135623730925, 14)
    expect((finding.evidence.pValue as number) / 0.009709662154539863).toBeCloseTo(1, 6)
    // The pooled reseed SD is sqrt(0.0002) as well, so the worsening is 7.071 SDs.
    expect(finding.evidence.worseningInReseedSds as number).toBeCloseTo(7.071067811865494, 12)
  })

  it('measures a one-refit worsening in paired bootstrap SDs', () => {
    // Replicates with mean −0.05 and SD 0.02 (sum of squares 0.0008 over 2): the worsening of 0.05 is z = 2.5 SEs and 2.5 SDs,
    // one-sided p = 0.006209665325776132 (scipy.stats.norm.sf(2.5), SciPy 1.10.1).
    const replicates = [-0.05, -0.03, -0.07]
    const [finding] = checkScoreRegression({ baseScores: [0.8], headScores: [0.75], pairedBootstrap: replicates }, { ...auc, blockAtSds: 3 })
    expect(finding.evidence.standardError as number).toBeCloseTo(0.02, 14)
    expect((finding.evidence.pValue as number) / 0.006209665325776132).toBeCloseTo(1, 6)
    expect(finding.evidence.worseningInReseedSds as number).toBeCloseTo(2.5, 12)
    expect(finding.severity).toBe('warn')
    expect(checkScoreRegression({ baseScores: [0.8], headScores: [0.75], pairedBootstrap: replicates }, { ...auc, blockAtSds: 2.4 })[0].severity).toBe('block')
    // With one refit on one side only and no bootstrap, nor a single replicate, there is no spread at
    // all: a worsening beyond tolerance counts as exact (p = 0), and it blocks whatever the SD line.
    for (const evidence of [
      { baseScores: [0.8, 0.82], headScores: [0.75] },
      { baseScores: [0.8], headScores: [0.75], pairedBootstrap: [-0.05] },
    ]) {
      const [exact] = checkScoreRegression(evidence, { ...auc, blockAtSds: 3 })
      expect(exact.severity).toBe('block')
      expect(exact.evidence).toMatchObject({ pValue: 0, standardError: null, welchDf: null, worseningInReseedSds: null })
      expect(exact.message).toContain('with one-sided p < 1e-6 (standard error n/a, from a paired bootstrap of holdout rows; level 0.05).')
    }
  })

  it('counts only a worsening strictly beyond the tolerance, and only a p-value strictly below the level', () => {
    // Worsening equal to the tolerance (the same floating-point difference): not beyond it, nothing.
    expect(checkScoreRegression({ baseScores: [0.8], headScores: [0.7] }, { ...auc, tolerance: 0.8 - 0.7 })).toEqual([])
    expect(checkScoreRegression({ baseScores: [0.8, 0.8], headScores: [0.7, 0.7] }, { ...auc, tolerance: 0.8 - 0.7 })).toEqual([])
    // An exact worsening has p = 0, which is not below a level of 0.
    expect(checkScoreRegression({ baseScores: [0.8], headScores: [0.7] }, { ...auc, alpha: 0 })).toEqual([])
    expect(checkScoreRegression({ baseScores: [0.8], headScores: [0.7] }, auc)).toHaveLength(1)
  })

  it('reports zero spread as exact: p = 0, no reseed SDs, and a block whatever the SD line', () => {
    const [finding] = checkScoreRegression({ baseScores: [0.8, 0.8], headScores: [0.7, 0.7] }, { ...auc, blockAtSds: 3 })
    expect(finding.severity).toBe('block')
    expect(finding.evidence).toMatchObject({ pValue: 0, standardError: 0, worseningInReseedSds: null })
  })
})

describe('checkScoreRegression: with refits, a block also needs the worsening beyond the holdout rows\' own noise', () => {
  // The refits: worsening 0.1, Welch p = 0.0024 and 6.32 pooled reseed SDs (values above). The paired
  // bootstrap replicates [-0.1, -0.1 + d, -0.1 - d] have SD d exactly; the row test is one-sided
  // normal on (worsening − tolerance) / d, p from scipy.stats.norm.sf (SciPy 1.10.1).
  const wide = [0.8, 0.82, 0.78]
  const narrow = [0.7, 0.71, 0.69]
  const replicates = (d: number) => [-0.1, -0.1 + d, -0.1 - d]

  it('blocks when the rows\' test is significant too: z = 0.1 / 0.06, p = 0.0477903522728147', () => {
    const [finding] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.06) }, auc)
    expect(finding.severity).toBe('block')
    expect(finding.evidence.holdoutRowStandardError as number).toBeCloseTo(0.06, 14)
    expect((finding.evidence.holdoutRowPValue as number) / 0.0477903522728147).toBeCloseTo(1, 6)
    // The Welch statistics still come from the refits, not from the bootstrap.
    expect(finding.evidence.standardError as number).toBeCloseTo(0.012909944487358039, 14)
    expect(finding.message).not.toContain('It warns rather than blocks')
  })

  it('warns, and says why, when another sample of rows could well show no worsening: z = 0.1 / 0.07, p = 0.07656372550983476', () => {
    const [finding] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.07) }, auc)
    expect(finding.severity).toBe('warn')
    expect((finding.evidence.holdoutRowPValue as number) / 0.07656372550983476).toBeCloseTo(1, 6)
    expect(finding.message).toContain(
      " It warns rather than blocks: against the holdout's own sampling noise (paired bootstrap of its rows, standard error 0.07) " +
        'the worsening has one-sided p = 0.077, so another sample of rows could well show no worsening.',
    )
    // The same evidence at a looser level (0.1) clears the rows' noise and blocks.
    expect(checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.07) }, { ...auc, alpha: 0.1 })[0].severity).toBe('block')
  })

  it('tests the rows on the worsening beyond the tolerance, as the refits are', () => {
    // Tolerance 0.08 at level 0.2: the Welch p is 0.1104 (above), the rows' p for 0.02 / 0.01 is
    // 0.022750131948179177 (scipy.stats.norm.sf(2)) and for 0.02 / 0.06 it is 0.3694413401817636.
    const loose = { ...auc, tolerance: 0.08, alpha: 0.2 }
    const [tight] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.01) }, loose)
    expect((tight.evidence.holdoutRowPValue as number) / 0.022750131948179177).toBeCloseTo(1, 6)
    expect(tight.severity).toBe('block')
    const [noisy] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.06) }, loose)
    expect((noisy.evidence.holdoutRowPValue as number) / 0.3694413401817636).toBeCloseTo(1, 6)
    expect(noisy.severity).toBe('warn')
  })

  it('leaves a warn policy a warning without the block sentence, and names only the SD line when both hold', () => {
    const [warned] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.07) }, { ...auc, action: 'warn' })
    expect(warned.severity).toBe('warn')
    expect(warned.message).not.toContain('It warns rather than blocks')
    // Under the SD line (6.32 < 6.5) and within the rows' noise: a warning, the rows' sentence left out.
    const [both] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: replicates(0.07) }, { ...auc, blockAtSds: 6.5 })
    expect(both.severity).toBe('warn')
    expect(both.message).not.toContain('It warns rather than blocks')
  })

  it('reads no row test from fewer than two replicates, nor without refits', () => {
    const [one] = checkScoreRegression({ baseScores: wide, headScores: narrow, pairedBootstrap: [-0.1] }, auc)
    expect(one.severity).toBe('block')
    expect(one.evidence).not.toHaveProperty('holdoutRowPValue')
    // One refit per side: the bootstrap is the test itself (z = 0.1 / 0.07), not a second one.
    const [single] = checkScoreRegression({ baseScores: [0.8], headScores: [0.7], pairedBootstrap: replicates(0.07) }, { ...auc, alpha: 0.1 })
    expect(single.severity).toBe('block')
    expect(single.evidence).not.toHaveProperty('holdoutRowPValue')
  })
})

describe('checkScoreRegression: the one-refit bootstrap branch and the SD line, at their edges', () => {
  it('measures a lower-is-better worsening as head minus base', () => {
    const [finding] = checkScoreRegression({ baseScores: [0.4, 0.41, 0.39], headScores: [0.5, 0.51, 0.49] }, { ...auc, metric: 'log-loss', higherIsBetter: false })
    expect(finding.evidence.worsening as number).toBeCloseTo(0.1, 12)
    expect(finding.evidence.baseMean as number).toBeCloseTo(0.4, 12)
    expect(finding.evidence.headMean as number).toBeCloseTo(0.5, 12)
  })

  it('uses two bootstrap replicates, and takes the tolerance off before the normal tail', () => {
    // Replicates −0.06 and −0.04: SD sqrt(0.0002) = 0.014142; worsening 0.05, tolerance 0.02:
    // z = 0.03 / 0.014142 = 2.1213, p = 0.016947426762344633 (scipy.stats.norm.sf, SciPy 1.10.1).
    const [finding] = checkScoreRegression({ baseScores: [0.8], headScores: [0.75], pairedBootstrap: [-0.06, -0.04] }, { ...auc, tolerance: 0.02 })
    expect(finding.evidence.standardError as number).toBeCloseTo(Math.sqrt(0.0002), 14)
    expect((finding.evidence.pValue as number) / 0.016947426762344).toBeCloseTo(1, 5)
    expect(finding.evidence.worseningInReseedSds as number).toBeCloseTo(0.05 / Math.sqrt(0.0002), 10)
  })

  it('with refits on one side only, reads the spread from the bootstrap', () => {
    // Base two refits, head one: no Welch test; the bootstrap SD 0.02 is the SE and the SD unit.
    const [finding] = checkScoreRegression({ baseScores: [0.8, 0.82], headScores: [0.75], pairedBootstrap: [-0.06, -0.04, -0.08] }, { ...auc, blockAtSds: 3 })
    expect(finding.evidence.welchDf).toBeNull()
    // Worsening 0.81 − 0.75 = 0.06 over SD 0.02: 3 SDs.
    expect(finding.evidence.worseningInReseedSds as number).toBeCloseTo(3, 10)
  })

  it('blocks at exactly blockAtSds reseed SDs (the line is "from ... on")', () => {
    const evidence = { baseScores: [0.8], headScores: [0.75], pairedBootstrap: [-0.05, -0.03, -0.07] }
    const sds = checkScoreRegression(evidence, auc)[0].evidence.worseningInReseedSds as number
    expect(sds).toBeCloseTo(2.5, 12)
    expect(checkScoreRegression(evidence, { ...auc, blockAtSds: sds })[0].severity).toBe('block')
    expect(checkScoreRegression(evidence, { ...auc, blockAtSds: sds + 1e-9 })[0].severity).toBe('warn')
  })
})
