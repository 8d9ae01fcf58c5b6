import type { Finding } from '../report/report.ts'
import { studentTCdf } from '../statistics/student-t-cdf.ts'
import { welchTTestFromSummary } from '../statistics/welch-t-test.ts'
import type { CheckAction } from './check-action.ts'
import { formatChange, formatNumber as fmt, formatPStatement } from '../report/format-number.ts'
import { mean } from './side-result.ts'
import { pooledStandardDeviation } from '../statistics/pooled-standard-deviation.ts'
import { sampleStandardDeviation } from '../statistics/sample-standard-deviation.ts'

export interface ScoreRegressionOptions {
  readonly action: CheckAction
  readonly metric: string
  readonly higherIsBetter: boolean
  /** Worsening allowed, in metric units, before it counts at all. */
  readonly tolerance: number
  /** One-sided significance level of the worsening beyond tolerance. */
  readonly alpha: number
  /**
   * A significant worsening blocks only from this many pooled reseed SDs of the score on; below it
   * the finding warns (a retrain with a changed feature set moves the score a little anyway).
   */
  readonly blockAtSds?: number
}

export interface ScoreEvidence {
  readonly baseScores: readonly number[]
  readonly headScores: readonly number[]
  /**
   * The paired bootstrap replicates of (head − base) metric over resampled holdout rows (both sides
   * scored on the same rows). With one refit per side (loaded models) their SD stands in for the
   * reseed spread; with refits it is the holdout's own sampling noise, which a block must also clear.
   */
  readonly pairedBootstrap?: readonly number[]
}

/**
 * Score regression beyond noise: the candidate's holdout metric is worse than the baseline's by more
 * than `tolerance`, and significantly so.
 *
 * With refits on both sides: a one-sided Welch test of H0 "worsening ≤ tolerance" on the per-refit
 * scores (Welch 1947, Biometrika 34; the same t and Welch–Satterthwaite df as welchTTestFromSummary,
 * shifted by the tolerance). With one refit per side: the paired bootstrap SE of the difference
 * (Efron & Tibshirani 1993, ch. 6) and a normal tail. Both sides are scored on the same holdout rows,
 * so only training noise (or row sampling, for the bootstrap) enters.
 */
export function checkScoreRegression(evidence: ScoreEvidence, options: ScoreRegressionOptions): Finding[] {
  const { baseScores, headScores } = evidence
  const baseMean = mean(baseScores)
  const headMean = mean(headScores)
  const worsening = options.higherIsBetter ? baseMean - headMean : headMean - baseMean
  let standardError: number
  let pValue: number
  let df: number | null = null
  if (baseScores.length >= 2 && headScores.length >= 2) {
    const welch = welchTTestFromSummary(summary(baseScores), summary(headScores))
    standardError = welch.standardError
    df = welch.df
    pValue = tailAbove(worsening - options.tolerance, standardError, (t) => 1 - studentTCdf(t, welch.df))
  } else if (evidence.pairedBootstrap && evidence.pairedBootstrap.length >= 2) {
    standardError = sampleStandardDeviation(evidence.pairedBootstrap)
    pValue = tailAbove(worsening - options.tolerance, standardError, (z) => 1 - studentTCdf(z, Infinity))
  } else {
    standardError = NaN
    pValue = worsening > options.tolerance ? 0 : 1
  }
  if (options.action === 'off' || !(worsening > options.tolerance) || !(pValue < options.alpha)) return []
  const spread = pooledSd(evidence)
  const worseningInSds = spread > 0 ? worsening / spread : Infinity
  // With refits, the Welch test above reads training noise only: on a few hundred holdout rows a
  // worsening can be reproducible across reseeds and still lie within what another sample of rows
  // would give. A block needs it beyond that as well (a one-sided normal test on the paired
  // bootstrap SE); otherwise the finding warns.
  const rows = df !== null && evidence.pairedBootstrap && evidence.pairedBootstrap.length >= 2 ? rowNoise(evidence.pairedBootstrap, worsening - options.tolerance) : null
  const withinRowNoise = rows !== null && !(rows.pValue < options.alpha)
  const belowSds = worseningInSds < (options.blockAtSds ?? 0)
  const severity = options.action === 'block' && (belowSds || withinRowNoise) ? 'warn' : options.action
  return [
    {
      kind: 'score-regression',
      severity,
      title: `Holdout ${options.metric} got worse: ${fmt(baseMean)} → ${fmt(headMean)} (${formatChange(baseMean, headMean)}, beyond reseed noise).`,
      message:
        `The candidate's mean holdout ${options.metric} is ${fmt(headMean)} against ${fmt(baseMean)} for the baseline ` +
        `(${options.higherIsBetter ? 'higher' : 'lower'} is better). The worsening of ${fmt(worsening)} exceeds the tolerance of ` +
        `${options.tolerance} with ${formatPStatement('one-sided p', pValue)} (standard error ${fmt(standardError)}` +
        (df === null ? ', from a paired bootstrap of holdout rows' : `, Welch df ${fmt(df)} over reseeded refits`) +
        `; level ${options.alpha}).` +
        (options.action === 'block' && !belowSds && withinRowNoise
          ? ` It warns rather than blocks: against the holdout's own sampling noise (paired bootstrap of its rows, standard error ` +
            `${fmt(rows!.standardError)}) the worsening has ${formatPStatement('one-sided p', rows!.pValue)}, so another sample of rows could well show no worsening.`
          : ''),
      evidence: {
        baseMean,
        headMean,
        worsening,
        tolerance: options.tolerance,
        standardError: Number.isFinite(standardError) ? standardError : null,
        welchDf: df,
        pValue,
        alpha: options.alpha,
        worseningInReseedSds: Number.isFinite(worseningInSds) ? worseningInSds : null,
        ...(rows ? { holdoutRowStandardError: rows.standardError, holdoutRowPValue: rows.pValue } : {}),
      },
    },
  ]
}

/** The holdout rows' sampling noise of the difference: the bootstrap SE and a one-sided normal tail of `excess`. */
function rowNoise(replicates: readonly number[], excess: number): { readonly standardError: number; readonly pValue: number } {
  const standardError = sampleStandardDeviation(replicates)
  return { standardError, pValue: tailAbove(excess, standardError, (z) => 1 - studentTCdf(z, Infinity)) }
}

/** Pooled SD of the per-refit scores of both sides, or the paired bootstrap SD with one refit. */
function pooledSd(evidence: ScoreEvidence): number {
  const { baseScores, headScores, pairedBootstrap } = evidence
  if (baseScores.length >= 2 && headScores.length >= 2) {
    return pooledStandardDeviation(sampleStandardDeviation(baseScores), sampleStandardDeviation(headScores))
  }
  if (pairedBootstrap && pairedBootstrap.length >= 2) return sampleStandardDeviation(pairedBootstrap)
  return NaN
}

function summary(values: readonly number[]) {
  return { mean: mean(values), sd: sampleStandardDeviation(values), n: values.length }
}

/** P(statistic > excess / se) under the given upper-tail function; a zero SE decides by the sign. */
function tailAbove(excess: number, se: number, upperTail: (t: number) => number): number {
  if (!(se > 0)) return excess > 0 ? 0 : 1
  return upperTail(excess / se)
}
