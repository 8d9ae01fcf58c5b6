/**
 * A hand-built GateReport for the demo scenario: a regional parcel courier predicting late
 * deliveries. The head branch adds `delivered_at_hour`, recorded when the parcel is delivered and so
 * unknown when the prediction is made: a leak. The numbers are invented for the demo; the derived
 * ones were worked out from them with NumPy and SciPy 1.10.1 (/usr/bin/python3):
 *  - mean, sample SD (ddof=1) and the 95% t interval mean ± t(0.975, 4) · SD / sqrt(5) of each
 *    feature's five per-refit importances, t(0.975, 4) = scipy.stats.t.ppf(0.975, 4);
 *  - welchT, welchDf, pValue: scipy.stats.ttest_ind(head, base, equal_var=False), df by
 *    Welch-Satterthwaite; adjustedPValue: Benjamini-Hochberg over the seven tested units;
 *  - Kendall tau-b 0.7333 = scipy.stats.kendalltau of the compared ranks; rank-biased overlap
 *    0.9548 = RBO_ext (Webber, Moffat & Zobel 2010, eq. 32) of the compared rankings at p = 0.9.
 */
import { reportCaution, type FeatureRow, type GateReport, type SideImportance } from '../../../src/core/report/report.ts'

/** scipy.stats.t.ppf(0.975, 4) (SciPy 1.10.1). */
const t975With4Df = 2.7764451051977987

function summarize(perRefit: readonly number[]) {
  const mean = perRefit.reduce((sum, v) => sum + v, 0) / perRefit.length
  const sd = Math.sqrt(perRefit.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (perRefit.length - 1))
  const half = (t975With4Df * sd) / Math.sqrt(perRefit.length)
  return { mean, lower: mean - half, upper: mean + half, refitSd: sd }
}

type PerRefit = Readonly<Record<string, readonly number[]>>

/** Importance per refit on each side, features only, ordered by mean (descending). */
const headFeatures: PerRefit = {
  delivered_at_hour: [0.2412, 0.2385, 0.245, 0.2398, 0.2431],
  distance_km: [0.0612, 0.0587, 0.064, 0.0598, 0.0621],
  stop_count: [0.0341, 0.0362, 0.0329, 0.0355, 0.0348],
  driver_shift: [0.0087, 0.0079, 0.0093, 0.0081, 0.009],
  depot: [0.0046, 0.0052, 0.0039, 0.0049, 0.0044],
  promised_window_h: [0.0035, 0.0041, 0.0029, 0.0038, 0.0033],
  weather_score: [0.0012, -0.0008, 0.0021, 0.0004, -0.0011],
}
const baseFeatures: PerRefit = {
  distance_km: [0.0755, 0.0731, 0.0779, 0.0748, 0.0762],
  stop_count: [0.0402, 0.0388, 0.0417, 0.0395, 0.0409],
  promised_window_h: [0.0301, 0.0287, 0.0315, 0.0294, 0.0308],
  driver_shift: [0.0112, 0.0098, 0.0121, 0.0105, 0.0116],
  depot: [0.0061, 0.0055, 0.0068, 0.0058, 0.0064],
  weather_score: [0.0058, 0.0049, 0.0066, 0.0052, 0.0061],
  legacy_zone: [0.0009, -0.0004, 0.0013, 0.0002, -0.0006],
}
const routeGroup = { head: [0.101, 0.0985, 0.1042, 0.099, 0.1021], base: [0.129, 0.1262, 0.1315, 0.1277, 0.1301] }

function side(features: PerRefit, name: string, perRefit: readonly number[], rank: number): SideImportance {
  const total = Object.values(features).reduce((sum, values) => sum + Math.max(0, summarize(values).mean), 0)
  const stats = summarize(perRefit)
  return {
    ...stats,
    drawSd: stats.refitSd * 0.6,
    rank,
    share: Math.max(0, stats.mean) / total,
    isAboveFloor: stats.lower > 0,
    perRefit,
  }
}

function sideOf(features: PerRefit, name: string): SideImportance | undefined {
  const names = Object.keys(features)
  return name in features ? side(features, name, features[name], names.indexOf(name) + 1) : undefined
}

/** Welch and BH values from SciPy 1.10.1 (see the file comment); positions among compared features. */
const shifts: Readonly<Record<string, NonNullable<FeatureRow['shift']>>> = {
  distance_km: { meanDifference: -0.01434, welchT: -11.837099543080832, welchDf: 7.827912882699519, pValue: 2.848804317002772e-6, adjustedPValue: 6.647210073006468e-6, isSignificant: true, positionsMoved: 0 },
  stop_count: { meanDifference: -0.00552, welchT: -7.220777685965951, welchDf: 7.900450491506264, pValue: 9.644371271129128e-5, adjustedPValue: 0.00016877649724475973, isSignificant: true, positionsMoved: 0 },
  driver_shift: { meanDifference: -0.00244, welchT: -5.037624847993539, welchDf: 6.881115838510479, pValue: 0.0015789470798041776, adjustedPValue: 0.0015789470798041776, isSignificant: true, positionsMoved: -1 },
  depot: { meanDifference: -0.00152, welchT: -4.797077463543303, welchDf: 7.995431254659961, pValue: 0.0013627857621546296, adjustedPValue: 0.0015789470798041776, isSignificant: true, positionsMoved: -1 },
  promised_window_h: { meanDifference: -0.02658, welchT: -49.58057906538898, welchDf: 5.344229859682744, pValue: 2.5146425404939587e-8, adjustedPValue: 1.645710794733013e-7, isSignificant: true, positionsMoved: 2 },
  weather_score: { meanDifference: -0.00536, welchT: -7.954939174420032, welchDf: 5.941829364829985, pValue: 0.00022043529313549906, adjustedPValue: 0.0003086094103896987, isSignificant: true, positionsMoved: 0 },
  route: { meanDifference: -0.02794, welchT: -20.10332081952296, welchDf: 7.880758752178779, pValue: 4.7020308420943226e-8, adjustedPValue: 1.645710794733013e-7, isSignificant: true, positionsMoved: null },
}

const kinds: Readonly<Record<string, 'numeric' | 'categorical'>> = {
  delivered_at_hour: 'numeric',
  distance_km: 'numeric',
  stop_count: 'numeric',
  driver_shift: 'categorical',
  depot: 'categorical',
  promised_window_h: 'numeric',
  weather_score: 'numeric',
  legacy_zone: 'numeric',
}

function featureRow(name: string): FeatureRow {
  const base = sideOf(baseFeatures, name)
  const head = sideOf(headFeatures, name)
  return {
    name,
    isGroup: false,
    presence: base && head ? 'both' : head ? 'added' : 'removed',
    kind: kinds[name],
    ...(base ? { base } : {}),
    ...(head ? { head: name === 'delivered_at_hour' ? { ...head, singleFeatureScore: 0.9931 } : head } : {}),
    ...(shifts[name] ? { shift: shifts[name] } : {}),
  }
}

const routeRow: FeatureRow = {
  name: 'route',
  isGroup: true,
  members: ['distance_km', 'stop_count'],
  presence: 'both',
  kind: 'group',
  base: side(baseFeatures, 'route', routeGroup.base, 1),
  head: side(headFeatures, 'route', routeGroup.head, 1),
  shift: shifts.route,
}

const baseScores = [0.3412, 0.3398, 0.3425, 0.3405, 0.3419]
const headScores = [0.1873, 0.186, 0.1891, 0.1868, 0.188]
const mean = (values: readonly number[]) => values.reduce((sum, v) => sum + v, 0) / values.length
const sd = (values: readonly number[]) => summarize(values).refitSd

export function courierReport(): GateReport {
  return {
    schemaVersion: 1,
    tool: { name: 'plumbline', version: '0.1.0' },
    verdict: 'block',
    headline:
      'Blocked: delivered_at_hour carries 68.1% of the head model’s importance and alone separates late deliveries, a leakage-like pattern.',
    findings: [
      {
        kind: 'leakage',
        severity: 'block',
        feature: 'delivered_at_hour',
        title: 'delivered_at_hour dominates the head model and alone separates late deliveries.',
        message:
          'Its share of the positive importance is 0.6814 (policy: 0.5) and it is 3.949 times the next feature (policy: 3). ' +
          'A one-feature model on it reaches holdout AUC 0.9931 (policy: 0.99).',
        evidence: {
          dominanceShare: 0.6814,
          dominanceShareLimit: 0.5,
          runnerUpRatio: 3.949,
          runnerUpRatioLimit: 3,
          singleFeatureScore: 0.9931,
          singleFeaturePower: 0.99,
        },
      },
      {
        kind: 'rank-shift',
        severity: 'warn',
        feature: 'promised_window_h',
        title: 'promised_window_h fell from rank 3 to rank 5 among features above the floor.',
        message: 'Its importance fell by 0.02658 (Welch t -49.58, 5.344 df), beyond the reseed noise.',
        evidence: { baseRank: 3, headRank: 5, positionsMoved: 2, meanDifference: -0.02658, pValue: 2.5146425404939587e-8, adjustedPValue: 1.645710794733013e-7 },
      },
      {
        kind: 'rank-agreement',
        severity: 'warn',
        title: 'The feature ranking changed more than reseeding alone changes it (Kendall tau-b 0.7333, RBO 0.9548).',
        message: 'Two refits with other seeds agree at least 0.8667 and 0.9718 in 95% of pairs.',
        evidence: { kendallTau: 0.7333, rankBiasedOverlap: 0.9548, kendallTauThreshold: 0.8667, rankBiasedOverlapThreshold: 0.9718, featuresCompared: 6, nullPairs: 20 },
      },
      {
        kind: 'feature-set',
        severity: 'info',
        title: 'This pull request added delivered_at_hour; removed legacy_zone; changed the kind of driver_shift (numeric → categorical).',
        message: 'Features are compared by column name. 1 added, 1 removed, 1 changed kind.',
        evidence: { added: 1, removed: 1, kindChanged: 1 },
      },
      {
        kind: 'floor-drop',
        severity: 'info',
        feature: 'weather_score',
        title: 'weather_score was above the floor on the base and is indistinguishable from zero on the head.',
        message: 'Its 95% interval went from [0.004871, 0.006569] to [-0.001307, 0.002027].',
        evidence: { baseLower: 0.004871, headLower: -0.001307 },
      },
    ],
    features: [...Object.keys(headFeatures).map(featureRow), routeRow, featureRow('legacy_zone')],
    featureSet: {
      added: ['delivered_at_hour'],
      removed: ['legacy_zone'],
      kindChanged: [{ name: 'driver_shift', base: 'numeric', head: 'categorical' }],
    },
    agreement: {
      kendallTau: 0.7333333333333333,
      rankBiasedOverlap: 0.954775,
      persistence: 0.9,
      nullKendallTau: [1, 0.8667, 1, 1, 0.8667, 1, 1, 1, 0.8667, 1, 1, 1, 0.8667, 1, 1, 1, 1, 0.8667, 1, 1],
      nullRankBiasedOverlap: [1, 0.9718, 1, 1, 0.9718, 1, 1, 1, 0.9718, 1, 1, 1, 0.9718, 1, 1, 1, 1, 0.9718, 1, 1],
      kendallTauThreshold: 0.8667,
      rankBiasedOverlapThreshold: 0.9718,
      featuresCompared: 6,
    },
    sides: {
      base: {
        side: 'base',
        ref: 'main',
        commit: '4e1f0c9a7b2d3e5f60718293a4b5c6d7e8f90a1b',
        trainRows: 48210,
        holdoutRows: 12053,
        evaluationRows: 12053,
        referenceRows: 10000,
        features: Object.keys(baseFeatures).map((name) => ({ name, kind: name === 'driver_shift' ? 'numeric' : kinds[name] })),
        model: { kind: 'gradient-boosting', description: 'gradient-boosting on 7 features' },
        scores: baseScores,
        scoreMean: mean(baseScores),
        scoreSd: sd(baseScores),
        refitSeeds: [2890135721, 118274650, 3302917554, 734119082, 1960478315],
        noiseCovers: 'refits-and-draws',
      },
      head: {
        side: 'head',
        ref: 'late-risk-delivery-hour',
        commit: 'b7c8d9e0f1a2b3c4d5e6f708192a3b4c5d6e7f80',
        trainRows: 48210,
        holdoutRows: 12053,
        evaluationRows: 12053,
        referenceRows: 10000,
        features: Object.keys(headFeatures).map((name) => ({ name, kind: kinds[name] })),
        model: { kind: 'gradient-boosting', description: 'gradient-boosting on 7 features' },
        scores: headScores,
        scoreMean: mean(headScores),
        scoreSd: sd(headScores),
        refitSeeds: [4011392857, 2273810946, 605548117, 3387214490, 1422906733],
        noiseCovers: 'refits-and-draws',
      },
    },
    settings: {
      task: 'binary',
      target: 'late',
      metric: 'log-loss',
      higherIsBetter: false,
      draws: 5,
      refits: 5,
      seed: 7,
      policySource: 'plumbline.yml',
      policyFrom: 'head',
      checks: {
        leakage: { action: 'block', dominanceShare: 0.5, runnerUpRatio: 3, singleFeaturePower: 0.99, relativePower: 0.8 },
        rankShift: { action: 'warn', falseDiscoveryRate: 0.05, minPositions: 2, agreementPercentile: 5 },
        score: { action: 'block', tolerance: 0, alpha: 0.05 },
        holdoutRows: { action: 'block' },
      },
    },
    timings: { prepare: 0.81, train: 41.27, importance: 63.9, checks: 0.05 },
    caution: reportCaution,
  }
}

/**
 * The courier report blown up for the size limits: `featureCount` feature rows (one per stop of a
 * long route table, say) and `findingCount` findings, a few blocking and the rest split between
 * warn and info, each with a message of about 200 characters and six evidence entries.
 */
export function oversizedReport(featureCount: number, findingCount: number): GateReport {
  const report = courierReport()
  const template = report.features[1]
  const features: FeatureRow[] = Array.from({ length: featureCount }, (_, i) => ({
    ...template,
    name: `route_leg_${String(i + 1).padStart(5, '0')}_minutes_behind_plan`,
    base: { ...template.base!, rank: i + 1 },
    head: { ...template.head!, rank: i + 1 },
  }))
  const findings = Array.from({ length: findingCount }, (_, i) => {
    const severity = i < 10 ? 'block' : i < findingCount / 2 ? 'warn' : 'info'
    const name = features[i % Math.max(1, featureCount)]?.name ?? `feature_${i}`
    return {
      kind: 'rank-shift' as const,
      severity,
      feature: name,
      title: `${name} moved ${(i % 7) + 2} places among features above the floor.`,
      message:
        `Its importance changed by ${(0.001 * (i + 1)).toFixed(4)} between the base and the head model, ` +
        'beyond what reseeded refits of the base model show; check how the column is computed on both sides.',
      evidence: { baseRank: i + 1, headRank: i + 3, positionsMoved: 2, meanDifference: -0.001 * (i + 1), pValue: 1e-4, adjustedPValue: 3e-4 },
    } as const
  })
  return { ...report, features, findings }
}
