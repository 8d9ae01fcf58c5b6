import type { SideMeasurement } from '../measure-side.ts'
import type { Metric } from '../metrics/metric.ts'
import { createBuiltinFit } from '../models/builtin-fit.ts'
import type { GateProgress, MeasureJob, MeasureSides, SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'
import { planSlices } from './plan-slices.ts'
import { executeInProcess, measureSidesWith } from './work-units.ts'

// In this thread, unit after unit (work-units.ts): the same plan and combination as every other executor.
const measureInTurn: MeasureSides = measureSidesWith(executeInProcess)

/**
 * The measurement request of one side: its refits (the built-in fit is built here, from the policy,
 * once per side), the importance settings, and progress reporting.
 */
export function measureJob(
  side: 'base' | 'head',
  data: SideInputs,
  settings: GateSettings,
  metric: Metric,
  onProgress?: (event: GateProgress) => void,
  dropAlso: readonly string[] = [],
): MeasureJob {
  const { model } = data
  const measuredSlices = planSlices(settings.policySlices, data.holdout, side, { task: settings.task, minRows: settings.checks.slices.minRows })
    .flatMap((s) => (s.status === 'measured' ? [{ name: s.name, rows: s.rows }] : []))
  const source =
    model.kind === 'builtin'
      ? { fit: createBuiltinFit(data.train, settings.task, settings.learner) }
      : model.kind === 'command'
        ? { fit: model.fit }
        : { model: model.model }
  return {
    inputs: { side, train: data.train, holdout: data.holdout, reference: data.reference, ...(data.unlabeled ? { unlabeled: data.unlabeled } : {}), ...source },
    options: {
      task: settings.task,
      metric,
      seed: settings.seed,
      refits: settings.refits,
      draws: settings.draws,
      groups: settings.groups,
      evaluationRows: settings.evaluationRows,
      referenceRows: settings.referenceRows,
      onRefit: (refit, of) => onProgress?.({ stage: 'refit', side, refit, of }),
      concurrentFits: model.kind === 'command',
      ...(settings.sensitivity ? { sensitivity: settings.sensitivity } : {}),
      ...(measuredSlices.length > 0 && settings.checks.slices.action !== 'off' ? { slices: measuredSlices } : {}),
      dropColumns: {
        top: settings.dropColumnTop,
        also: dropAlso.slice(0, settings.singleFeatureMaxExtra),
        groupTop: settings.dropGroupTop,
        groupMembers: settings.dropGroupMembers,
      },
    },
    ...(model.kind === 'builtin' ? { builtin: { task: settings.task, settings: settings.learner } } : {}),
  }
}

/** Both sides' measurement requests: features the pull request adds or changes are refitted without on the head (changed ones on the base too). */
export function measureJobs(
  base: SideInputs,
  head: SideInputs,
  settings: GateSettings,
  metric: Metric,
  options: {
    readonly onProgress?: (event: GateProgress) => void
    readonly touched?: { readonly added: readonly string[]; readonly changed: readonly string[] }
  },
): readonly [MeasureJob, MeasureJob] {
  const added = options.touched?.added ?? []
  const changed = options.touched?.changed ?? []
  return [
    measureJob('base', base, settings, metric, options.onProgress, changed),
    measureJob('head', head, settings, metric, options.onProgress, [...added, ...changed]),
  ] as const
}

/** Both sides' refits and importances, through the adapter's `measureSides` (default: in turn, here). */
export function measureBothSides(jobs: readonly [MeasureJob, MeasureJob], measureSides?: MeasureSides): Promise<readonly [SideMeasurement, SideMeasurement]> {
  return (measureSides ?? measureInTurn)(jobs)
}
