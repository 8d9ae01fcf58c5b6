import type { DropColumnEstimate } from '../importance/drop-column-importance.ts'
/**
 * The GateReport out of the measured sides, the findings and the settings: pure assembly, no
 * judgment (the checks in src/core/checks/ decide; this module only lays out what they found).
 */
import type { RankAgreement } from './report.ts'
import type { Shift } from '../checks/rank-shift.ts'
import { mean, positiveShare, sideRanks, type SideResult } from '../checks/side-result.ts'
import { decideVerdict, writeHeadline } from '../checks/verdict.ts'
import type { ViewsOutcome } from '../gate/judge-views.ts'
import type { FeatureSetChange } from '../checks/feature-set.ts'
import type { RowCapRecord } from '../data/cap-table-rows.ts'
import type { Dataset } from '../data/dataset.ts'
import type { SideRowSampling } from '../gate/cap-side-rows.ts'
import type { SideInputs } from '../gate/gate-inputs.ts'
import type { GateSettings } from '../gate/gate-settings.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { SideMeasurement } from '../measure-side.ts'
import type { Metric } from '../metrics/metric.ts'
import { sampleStandardDeviation } from '../statistics/sample-standard-deviation.ts'
import { reportCaution, type FeatureRow, type Finding, type GateReport, type RowSample, type SideImportance, type SideSummary } from './report.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

export interface ReportParts {
  readonly toolVersion: string
  readonly policySource: string
  readonly settings: GateSettings
  readonly metric: Metric
  readonly sides: { readonly base: SideInputs; readonly head: SideInputs }
  /** What the row caps sampled on each side (capSideRows); absent or empty: nothing. */
  readonly rowSampling?: { readonly base: SideRowSampling; readonly head: SideRowSampling }
  readonly measured: readonly [SideMeasurement, SideMeasurement]
  readonly results: { readonly base: SideResult; readonly head: SideResult }
  readonly featureSet: FeatureSetChange
  /** Sorted, consequences demoted. */
  readonly findings: readonly Finding[]
  readonly shifts: ReadonlyMap<string, Shift>
  readonly agreement: RankAgreement | null
  /** Prediction sensitivity and gain (their findings are already in `findings`). */
  readonly views?: ViewsOutcome
  readonly timings: Readonly<Record<string, number>>
}

export function assembleReport(parts: ReportParts): GateReport {
  const { settings, metric, views, findings } = parts
  const [base, head] = parts.measured
  const verdict = decideVerdict(findings)
  return {
    schemaVersion: 1,
    tool: { name: 'plumbline', version: parts.toolVersion },
    verdict,
    headline: writeHeadline(verdict, findings),
    findings: [...findings],
    features: featureRows(parts.results.base, parts.results.head, parts.shifts, parts.sides.base.train, parts.sides.head.train),
    featureSet: parts.featureSet,
    agreement: parts.agreement,
    sides: describeSides(parts.sides, base, head, parts.rowSampling),
    settings: {
      task: settings.task,
      ...(settings.task === 'multiclass' ? { classes: parts.sides.head.train.target?.classes ?? [] } : {}),
      target: settings.target,
      metric: metric.name,
      higherIsBetter: metric.higherIsBetter,
      draws: settings.draws,
      refits: settings.refits,
      seed: settings.seed,
      policySource: parts.policySource,
      policyFrom: 'head',
      checks: settings.evidence,
    },
    timings: { ...parts.timings },
    ...(views?.sensitivity ? { sensitivity: views.sensitivity } : {}),
    ...(views?.gain ? { gain: views.gain } : {}),
    ...(views?.groups ? { groups: views.groups } : {}),
    ...(views?.slices ? { slices: views.slices } : {}),
    caution: reportCaution,
  }
}

/** One row per feature and group, head's ranking first, then what only the base has. */
export function featureRows(
  base: SideResult,
  head: SideResult,
  shifts: ReadonlyMap<string, Shift>,
  baseTrain: Dataset,
  headTrain: Dataset,
): FeatureRow[] {
  const kindOf = new Map<string, 'numeric' | 'categorical'>()
  for (const f of [...baseTrain.features, ...headTrain.features]) kindOf.set(f.name, f.kind)
  const stats = (side: SideResult) => {
    const ranks = sideRanks(side.importances)
    return new Map(
      side.importances.map((u): [string, SideImportance] => [
        `${u.isGroup}:${u.name}`,
        {
          mean: u.mean,
          lower: u.lower,
          upper: u.upper,
          refitSd: u.refitSd,
          drawSd: u.drawSd,
          rank: ranks.get(`${u.isGroup}:${u.name}`)!,
          share: positiveShare(side.importances, u.name),
          isAboveFloor: u.isAboveFloor,
          perRefit: u.perRefit,
          ...(side.singleFeatureSeparation[u.name] !== undefined && !u.isGroup
            ? { singleFeatureScore: side.singleFeatureSeparation[u.name] }
            : {}),
          ...(side.dropColumns?.[u.name] && !u.isGroup ? { dropColumn: dropColumnOf(side.dropColumns[u.name]) } : {}),
          ...(side.dropGroups?.[u.name] && u.isGroup ? { dropColumn: dropColumnOf(side.dropGroups[u.name]) } : {}),
        },
      ]),
    )
  }
  const b = stats(base)
  const h = stats(head)
  const rows: FeatureRow[] = []
  const seen = new Set<string>()
  const push = (unit: FlooredImportance) => {
    const key = `${unit.isGroup}:${unit.name}`
    if (seen.has(key)) return
    seen.add(key)
    const bs = b.get(key)
    const hs = h.get(key)
    rows.push({
      name: unit.name,
      isGroup: unit.isGroup,
      ...(unit.isGroup ? { members: unit.members } : {}),
      presence: bs && hs ? 'both' : hs ? 'added' : 'removed',
      kind: unit.isGroup ? 'group' : kindOf.get(unit.name),
      ...(bs ? { base: bs } : {}),
      ...(hs ? { head: hs } : {}),
      ...(bs && hs && shifts.has(unit.name) ? { shift: shifts.get(unit.name)! } : {}),
    })
  }
  // Features first, then groups, each by mean importance.
  const byMean = (units: readonly FlooredImportance[]) => [false, true].flatMap((isGroup) => rankByValue(units.filter((u) => u.isGroup === isGroup), (u) => u.mean))
  byMean(head.importances).forEach(push)
  byMean(base.importances).forEach(push)
  return rows
}

/** Each side as the report shows it: refs, row counts, the model, and the per-refit holdout scores. */
export function describeSides(
  inputs: { readonly base: SideInputs; readonly head: SideInputs },
  base: SideMeasurement,
  head: SideMeasurement,
  rowSampling?: { readonly base: SideRowSampling; readonly head: SideRowSampling },
): GateReport['sides'] {
  const describe = (side: 'base' | 'head', data: SideInputs, m: SideMeasurement): SideSummary => {
    const sampled = rowSampling?.[side]
    const sampling = {
      ...(sampled?.train ? { train: samplingOf(sampled.train) } : {}),
      ...(sampled?.holdout ? { holdout: samplingOf(sampled.holdout) } : {}),
    }
    return {
      side,
      ref: data.ref,
      commit: data.commit,
      trainRows: data.train.rows,
      holdoutRows: data.holdout.rows,
      evaluationRows: m.evaluationRows,
      referenceRows: m.referenceRows,
      features: data.train.features.map((f) => ({ name: f.name, kind: f.kind })),
      model: { kind: m.model.kind, description: describeModel(m.model), engine: m.model.engine },
      scores: m.scores,
      scoreMean: mean(m.scores),
      scoreSd: sampleStandardDeviation(m.scores),
      refitSeeds: m.refitSeeds,
      noiseCovers: m.noiseCovers,
      ...(sampling.train || sampling.holdout ? { rowSampling: sampling } : {}),
    }
  }
  return { base: describe('base', inputs.base, base), head: describe('head', inputs.head, head) }
}


function samplingOf(record: RowCapRecord): RowSample {
  return { rows: record.rows, kept: record.kept, seed: record.seed }
}

const engineNames = {
  'plumbline-trees': "plumbline's tree evaluator",
  'plumbline-linear': "plumbline's linear evaluator",
  onnxruntime: 'onnxruntime',
} as const

/** "boosted on 12 features, evaluated by plumbline's tree evaluator". */
function describeModel(model: SideMeasurement['model']): string {
  const count = model.featureNames.length
  const engine = model.engine ? `, evaluated by ${engineNames[model.engine]}` : ''
  return `${model.kind} on ${count} feature${count === 1 ? '' : 's'}${engine}`
}

function dropColumnOf(d: DropColumnEstimate): NonNullable<SideImportance['dropColumn']> {
  return { loss: d.mean, lower: d.lower, upper: d.upper, pValue: d.pValue, isAboveNoise: d.isAboveNoise, perRefit: d.perRefit }
}
