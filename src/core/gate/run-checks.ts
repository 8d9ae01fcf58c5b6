import { contextFindings } from '../checks/context-findings.ts'
import { demoteConsequences } from '../checks/demote-consequences.ts'
import { featureSetFindings, type FeatureSetChange } from '../checks/feature-set.ts'
import { checkHoldoutRows, type HoldoutIdentity } from '../checks/holdout-rows.ts'
import { checkLeakage } from '../checks/leakage.ts'
import { checkRankAgreement } from '../checks/rank-agreement.ts'
import { checkRankShift, type Shift } from '../checks/rank-shift.ts'
import { checkScoreRegression } from '../checks/score-regression.ts'
import type { SideResult } from '../checks/side-result.ts'
import { groupConsequences } from '../checks/group-consequences.ts'
import { orderFindings } from '../checks/verdict.ts'
import type { Dataset } from '../data/dataset.ts'
import type { SideMeasurement } from '../measure-side.ts'
import type { Metric } from '../metrics/metric.ts'
import type { Finding, RankAgreement } from '../report/report.ts'
import { pairedBootstrap } from '../statistics/paired-bootstrap.ts'
import type { GateSettings } from './gate-settings.ts'

export interface CheckInputs {
  readonly settings: GateSettings
  readonly metric: Metric
  /** The whole holdouts, for the holdout-rows check (a changed row is seen even when a cap sampled it out). */
  readonly holdouts: { readonly base: Dataset; readonly head: Dataset }
  /** The target of the holdout rows the models were scored on (the capped holdout), for the paired bootstrap. */
  readonly scoredTarget: Float64Array
  readonly measured: readonly [SideMeasurement, SideMeasurement]
  readonly results: { readonly base: SideResult; readonly head: SideResult }
  readonly featureSet: FeatureSetChange
  readonly changed: ReadonlySet<string>
  readonly policyChanged: boolean
  readonly policySource: string
  /** Findings of the views beside permutation importance (judge-views.ts), sorted and demoted with the rest. */
  readonly viewFindings?: readonly Finding[]
}

export interface CheckOutcome {
  /** In report order (orderFindings), consequences of a blocking leak demoted to info and redistributions grouped. */
  readonly findings: readonly Finding[]
  readonly shifts: ReadonlyMap<string, Shift>
  readonly agreement: RankAgreement | null
}

/** Every check of the policy over the two measured sides, and their findings in report order. */
export function runChecks(inputs: CheckInputs): CheckOutcome {
  const { settings, metric, holdouts, results, featureSet } = inputs
  const [base, head] = inputs.measured
  const holdoutFindings = checkHoldoutRows(holdoutIdentity(holdouts.base), holdoutIdentity(holdouts.head), settings.checks.holdoutRows)
  const sameRows = holdoutFindings.length === 0
  const leakage = checkLeakage(
    { base: results.base, head: results.head, added: new Set(featureSet.added), changed: inputs.changed },
    { ...settings.checks.leakage, task: settings.task, metricName: metric.name },
  )
  const shift = checkRankShift(results.base, results.head, settings.checks.rankShift)
  const agreement = checkRankAgreement(results.base, results.head, settings.checks.rankAgreement)
  // Resampling holdout rows needs the same rows on both sides. With one refit on a side (a loaded
  // model) it is the score's noise; with refits, a block must clear it beside the reseed noise.
  const bootstrap =
    sameRows
      ? pairedBootstrap(inputs.scoredTarget, base.firstPredictions, head.firstPredictions, {
          metric,
          replicates: settings.pairedBootstrapReplicates,
          seed: settings.seed,
        })
      : undefined
  const score = checkScoreRegression(
    { baseScores: base.scores, headScores: head.scores, pairedBootstrap: bootstrap },
    { ...settings.checks.score, metric: metric.name, higherIsBetter: metric.higherIsBetter },
  )
  const demoted = demoteConsequences([
      ...holdoutFindings,
      ...leakage,
      ...score,
      ...shift.findings,
      ...agreement.findings,
      ...featureSetFindings(featureSet, results.head),
    ...(inputs.viewFindings ?? []),
    ...contextFindings({ policyChanged: inputs.policyChanged, policySource: inputs.policySource, baseNoise: base.noiseCovers, headNoise: head.noiseCovers }),
  ])
  const findings = orderFindings(groupConsequences(demoted, results, featureSet), {
    added: featureSet.added,
    removed: featureSet.removed,
    changed: inputs.changed,
  })
  return { findings, shifts: shift.shifts, agreement: agreement.agreement }
}

function holdoutIdentity(holdout: Dataset): HoldoutIdentity {
  return {
    source: holdout.source,
    rows: holdout.rows,
    ids: holdout.ids?.values,
    idName: holdout.ids?.name,
    target: holdout.target!.values,
  }
}
