import type { Finding, RankAgreement } from '../report/report.ts'
import { kendallTauB } from '../statistics/kendall-tau-b.ts'
import { percentile } from '../statistics/percentile.ts'
import { rankBiasedOverlap } from '../statistics/rank-biased-overlap.ts'
import type { CheckAction } from './check-action.ts'
import { formatNumber as fmt } from '../report/format-number.ts'
import { mean, type SideResult } from './side-result.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

export interface RankAgreementOptions {
  readonly action: CheckAction
  /** Flag when the cross agreement is below this percentile (0–100) of the reseed null. */
  readonly agreementPercentile: number
  /** RBO persistence p: the weight of the top d ranks grows with 1 − p (Webber et al. 2010, eq. 21). */
  readonly persistence: number
}

/**
 * Global agreement of the two sides' feature rankings against the reseed null.
 *
 * Features compared: on both sides and above the noise floor on at least one. For every pair
 * (base refit i, head refit j) Kendall's tau-b between the two refits' importances and rank-biased
 * overlap (RBO_EXT, Webber, Moffat & Zobel 2010) between their rankings; the cross agreement is the
 * mean over those R² pairs. The null is the same statistic over pairs of refits within a side (base
 * pairs and head pairs, R(R−1) values): how much two retrains with other seeds disagree anyway. The
 * ranking is flagged when the cross mean is below the null's `agreementPercentile` percentile for
 * either statistic. Needs at least 3 compared features and 2 refits per side; otherwise null.
 */
export function checkRankAgreement(
  base: SideResult,
  head: SideResult,
  options: RankAgreementOptions,
): { findings: Finding[]; agreement: RankAgreement | null } {
  const baseIndex = new Map(base.importances.map((u, i) => [u.name, i]))
  const names = head.importances
    .filter((h) => {
      const bi = baseIndex.get(h.name)
      return !h.isGroup && bi !== undefined && (h.isAboveFloor || base.importances[bi].isAboveFloor)
    })
    .map((h) => h.name)
  if (names.length < 3 || base.perRefit.length < 2 || head.perRefit.length < 2) {
    return { findings: [], agreement: null }
  }
  const headIndex = new Map(head.importances.map((u, i) => [u.name, i]))
  const vector = (side: SideResult, index: Map<string, number>, refit: number) =>
    names.map((name) => side.perRefit[refit][index.get(name)!].mean)
  const baseVectors = base.perRefit.map((_, r) => vector(base, baseIndex, r))
  const headVectors = head.perRefit.map((_, r) => vector(head, headIndex, r))

  const tau = (a: number[], b: number[]) => kendallTauB(a, b)
  const rbo = (a: number[], b: number[]) =>
    rankBiasedOverlap(order(names, a), order(names, b), { persistence: options.persistence }).extrapolated

  const crossTau: number[] = []
  const crossRbo: number[] = []
  for (const a of baseVectors) {
    for (const b of headVectors) {
      crossTau.push(tau(a, b))
      crossRbo.push(rbo(a, b))
    }
  }
  const nullTau: number[] = []
  const nullRbo: number[] = []
  for (const vectors of [baseVectors, headVectors]) {
    for (let i = 0; i < vectors.length; i++) {
      for (let j = i + 1; j < vectors.length; j++) {
        nullTau.push(tau(vectors[i], vectors[j]))
        nullRbo.push(rbo(vectors[i], vectors[j]))
      }
    }
  }
  const finiteTau = nullTau.filter(Number.isFinite)
  const kendallTau = mean(crossTau.filter(Number.isFinite))
  const rankBiased = mean(crossRbo)
  const tauThreshold = finiteTau.length ? percentile(finiteTau, options.agreementPercentile) : NaN
  const rboThreshold = percentile(nullRbo, options.agreementPercentile)
  const agreement: RankAgreement = {
    kendallTau,
    rankBiasedOverlap: rankBiased,
    persistence: options.persistence,
    nullKendallTau: nullTau,
    nullRankBiasedOverlap: nullRbo,
    kendallTauThreshold: tauThreshold,
    rankBiasedOverlapThreshold: rboThreshold,
    featuresCompared: names.length,
  }
  const findings: Finding[] = []
  const tauLow = kendallTau < tauThreshold
  const rboLow = rankBiased < rboThreshold
  if (options.action !== 'off' && (tauLow || rboLow)) {
    findings.push({
      kind: 'rank-agreement',
      severity: options.action,
      title: `The feature ranking changed more than reseeding alone changes it (Kendall tau-b ${fmt(kendallTau)}, RBO ${fmt(rankBiased)}).`,
      message:
        `Over ${names.length} features above the noise floor, base and head refits agree with Kendall tau-b ${fmt(kendallTau)} ` +
        `and rank-biased overlap ${fmt(rankBiased)} (RBO_EXT, p = ${options.persistence}); two refits with other seeds agree at ` +
        `least ${fmt(tauThreshold)} and ${fmt(rboThreshold)} in ${100 - options.agreementPercentile}% of pairs.`,
      evidence: {
        kendallTau,
        rankBiasedOverlap: rankBiased,
        kendallTauThreshold: tauThreshold,
        rankBiasedOverlapThreshold: rboThreshold,
        featuresCompared: names.length,
        nullPairs: nullTau.length,
      },
    })
  }
  return { findings, agreement }
}

function order(names: readonly string[], values: readonly number[]): string[] {
  return rankByValue(
    names.map((name, i) => ({ name, value: values[i] })),
    (x) => x.value,
  ).map((x) => x.name)
}
