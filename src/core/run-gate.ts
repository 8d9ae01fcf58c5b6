/**
 * The gate on one screen: both sides measured, the checks run on the numbers, one GateReport out.
 * Pure: the adapters read files, run git and training commands, and pass the results in.
 */
import { checkHoldoutRows } from './checks/holdout-rows.ts'
import { checkLeakage } from './checks/leakage.ts'
import { checkRankAgreement } from './checks/rank-agreement.ts'
import { checkRankShift } from './checks/rank-shift.ts'
import { checkScoreRegression } from './checks/score-regression.ts'
import { rankFeatures, type SideResult } from './checks/side-result.ts'
import { decideVerdict, sortFindings, writeHeadline } from './checks/verdict.ts'
import { demoteConsequences } from './checks/demote-consequences.ts'
import type { GateConfig } from './config.ts'
import { selectRows, type Dataset, type FeatureMatrix, type Task } from './data/dataset.ts'
import { measureSide, type MeasureSideInputs, type MeasureSideOptions, type SideMeasurement } from './measure-side.ts'
import { metricByName } from './metrics/metric-by-name.ts'
import { createBuiltinFit, type BuiltinLearnerSettings } from './models/builtin-fit.ts'
import type { Fit, Model } from './models/model.ts'
import { describeSides, featureRows, featureSetFindings, changedFeatures, diffFeatureSets } from './assemble-report.ts'
import { pairedBootstrap } from './statistics/paired-bootstrap.ts'
import { reportCaution, type Finding, type GateReport } from './report/report.ts'
import { singleFeatureSeparation, type SeparationResult } from './single-feature-separation.ts'
import { gateSettings } from './gate-settings.ts'

export interface SideInputs {
  readonly ref: string
  readonly commit: string | null
  readonly train: Dataset
  readonly holdout: Dataset
  readonly reference: FeatureMatrix
  /** Exactly one of fit (refits) and model (a loaded model, one "refit"). */
  readonly fit?: Fit
  readonly model?: Model
  /** With `fit`, when it is the built-in learner: what rebuilds it elsewhere (a worker thread). */
  readonly builtin?: { readonly task: Task; readonly settings: BuiltinLearnerSettings }
}

/** One side's measurement request, as measureSide takes it. */
export interface MeasureJob {
  readonly inputs: MeasureSideInputs
  readonly options: MeasureSideOptions
  readonly builtin?: { readonly task: Task; readonly settings: BuiltinLearnerSettings }
}

/** Measures both sides; the default does one after the other in this thread. */
export type MeasureSides = (jobs: readonly [MeasureJob, MeasureJob]) => Promise<readonly [SideMeasurement, SideMeasurement]>

const measureInTurn: MeasureSides = async ([base, head]) => [
  await measureSide(base.inputs, base.options),
  await measureSide(head.inputs, head.options),
]

export type GateProgress =
  | { readonly stage: 'refit'; readonly side: 'base' | 'head'; readonly refit: number; readonly of: number }
  | { readonly stage: 'single-feature'; readonly side: 'base' | 'head'; readonly features: number }
  | { readonly stage: 'checks' }

export interface GateInputs {
  readonly config: GateConfig
  readonly policySource: string
  /** The pull request changes the policy file (the head's policy governs both sides). */
  readonly policyChanged: boolean
  readonly base: SideInputs
  readonly head: SideInputs
  readonly toolVersion: string
  readonly onProgress?: (event: GateProgress) => void
  /** How the two sides are measured (the CLI runs them in two worker threads); default: in turn, here. */
  readonly measureSides?: MeasureSides
  /** Seconds on some monotonic clock, for timings only; omitted, timings are empty. */
  readonly now?: () => number
}

export async function runGate(gateInputs: GateInputs): Promise<GateReport> {
  const inputs = { ...gateInputs, head: { ...gateInputs.head, holdout: alignHoldout(gateInputs.base.holdout, gateInputs.head.holdout) } }
  const settings = gateSettings(inputs.config)
  const { task } = settings
  const metric = metricByName(settings.metric, task)
  const clock = inputs.now
  const timings: Record<string, number> = {}
  const timed = async <T>(label: string, work: () => Promise<T>): Promise<T> => {
    const start = clock?.()
    const value = await work()
    if (clock && start !== undefined) timings[label] = clock() - start
    return value
  }

  const job = (side: 'base' | 'head', data: SideInputs): MeasureJob => ({
    inputs: { side, train: data.train, holdout: data.holdout, reference: data.reference, fit: data.fit, model: data.model },
    options: {
      task,
      metric,
      seed: settings.seed,
      refits: settings.refits,
      draws: settings.draws,
      groups: settings.groups,
      evaluationRows: settings.evaluationRows,
      referenceRows: settings.referenceRows,
      onRefit: (refit, of) => inputs.onProgress?.({ stage: 'refit', side, refit, of }),
      concurrentFits: !data.builtin,
    },
    ...(data.builtin ? { builtin: data.builtin } : {}),
  })
  const [base, head] = await timed('measureSeconds', () =>
    (inputs.measureSides ?? measureInTurn)([job('base', inputs.base), job('head', inputs.head)]),
  )

  const featureSet = diffFeatureSets(inputs.base.train, inputs.head.train)
  const added = new Set(featureSet.added)
  const changed = changedFeatures(inputs.base, inputs.head)

  // Single-feature separation for the features a leak could hide in: the top of each ranking and
  // everything the pull request added or changed. The same names on both sides.
  const candidates = new Set<string>([
    ...rankFeatures(head.importances).slice(0, settings.singleFeatureTop).map((u) => u.name),
    ...rankFeatures(base.importances).slice(0, settings.singleFeatureTop).map((u) => u.name),
    ...[...added, ...changed].slice(0, settings.singleFeatureMaxExtra),
  ])
  const separationOf = (side: 'base' | 'head', data: SideInputs) =>
    timed(`${side}SingleFeatureSeconds`, async () => {
      inputs.onProgress?.({ stage: 'single-feature', side, features: candidates.size })
      const fit = createBuiltinFit(data.train, task, settings.singleFeatureLearner)
      return singleFeatureSeparation(data.train, data.holdout, [...candidates], {
        fit,
        task,
        seed: settings.seed,
        side,
        slices: settings.slices,
      })
    })
  const baseSingle = await separationOf('base', inputs.base)
  const headSingle = await separationOf('head', inputs.head)

  inputs.onProgress?.({ stage: 'checks' })
  const sideResult = (side: 'base' | 'head', data: SideInputs, m: SideMeasurement, single: SeparationResult): SideResult => ({
    side,
    features: data.train.features.map((f) => ({ name: f.name, kind: f.kind })),
    scores: m.scores,
    separation: m.separation,
    importances: m.importances,
    perRefit: m.perRefit,
    singleFeatureSeparation: single.overall,
    singleFeatureSlices: single.bestSlice,
    noiseCovers: m.noiseCovers,
  })
  const baseResult = sideResult('base', inputs.base, base, baseSingle)
  const headResult = sideResult('head', inputs.head, head, headSingle)

  const holdoutFindings = checkHoldoutRows(identity(inputs.base.holdout), identity(inputs.head.holdout), settings.checks.holdoutRows)
  const sameRows = holdoutFindings.length === 0
  const leakage = checkLeakage({ base: baseResult, head: headResult, added, changed }, { ...settings.checks.leakage, task })
  const shift = checkRankShift(baseResult, headResult, settings.checks.rankShift)
  const agreement = checkRankAgreement(baseResult, headResult, settings.checks.rankAgreement)
  const score = checkScoreRegression(
    {
      baseScores: base.scores,
      headScores: head.scores,
      pairedBootstrap:
        sameRows && (base.scores.length < 2 || head.scores.length < 2)
          ? pairedBootstrap(inputs.base.holdout.target!.values, base.firstPredictions, head.firstPredictions, {
              metric,
              replicates: 200,
              seed: settings.seed,
            })
          : undefined,
    },
    { ...settings.checks.score, metric: metric.name, higherIsBetter: metric.higherIsBetter },
  )
  const context: Finding[] = []
  if (inputs.policyChanged) {
    context.push({
      kind: 'policy-changed',
      severity: 'warn',
      title: `This pull request changes the policy file ${inputs.policySource}.`,
      message: `The head's policy governs both sides of this comparison. Review the policy change itself: a loosened threshold or a check turned off changes what this gate can see.`,
      evidence: { policySource: inputs.policySource },
    })
  }
  if (base.noiseCovers === 'draws-only' || head.noiseCovers === 'draws-only') {
    context.push({
      kind: 'noise-model',
      severity: 'info',
      title: 'The model was loaded, not retrained: the noise floor covers permutation draws only.',
      message:
        'A loaded model cannot be reseeded, so the spread a retrain with another seed would cause is unknown. Rank shifts are tested on ' +
        'per-draw values and the score on a paired bootstrap of holdout rows; both understate training noise. Use model.train to refit.',
      evidence: { baseNoise: base.noiseCovers, headNoise: head.noiseCovers },
    })
  }
  const findings = sortFindings(demoteConsequences([
    ...holdoutFindings,
    ...leakage,
    ...score,
    ...shift.findings,
    ...agreement.findings,
    ...featureSetFindings(featureSet, headResult, settings.checks.featureSet),
    ...context,
  ]))
  const verdict = decideVerdict(findings)
  return {
    schemaVersion: 1,
    tool: { name: 'plumbline', version: inputs.toolVersion },
    verdict,
    headline: writeHeadline(verdict, findings),
    findings,
    features: featureRows(baseResult, headResult, shift.shifts, inputs.base.train, inputs.head.train),
    featureSet,
    agreement: agreement.agreement,
    sides: describeSides(inputs, base, head),
    settings: {
      task,
      target: settings.target,
      metric: metric.name,
      higherIsBetter: metric.higherIsBetter,
      draws: settings.draws,
      refits: settings.refits,
      seed: settings.seed,
      policySource: inputs.policySource,
      policyFrom: 'head',
      checks: settings.evidence,
    },
    timings,
    caution: reportCaution,
  }
}

/**
 * The head's holdout in the base's row order when both have ids and hold the same ids (each once) in
 * another order, so that a pull request that only reorders the holdout file compares row by row.
 * Anything else is left as it is for the holdout-rows check to judge.
 */
function alignHoldout(base: Dataset, head: Dataset): Dataset {
  if (!base.ids || !head.ids || base.rows !== head.rows) return head
  const position = new Map<string, number>()
  head.ids.values.forEach((id, i) => position.set(id, i))
  if (position.size !== head.rows || new Set(base.ids.values).size !== base.rows) return head
  const order: number[] = []
  for (const id of base.ids.values) {
    const i = position.get(id)
    if (i === undefined) return head
    order.push(i)
  }
  if (order.every((i, k) => i === k)) return head
  return selectRows(head, order)
}

function identity(holdout: Dataset) {
  return {
    source: holdout.source,
    rows: holdout.rows,
    ids: holdout.ids?.values,
    idName: holdout.ids?.name,
    target: holdout.target!.values,
  }
}
