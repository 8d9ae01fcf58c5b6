import { measureSide, type SideMeasurement } from '../measure-side.ts'
import type { Metric } from '../metrics/metric.ts'
import { createBuiltinFit } from '../models/builtin-fit.ts'
import type { GateProgress, MeasureJob, MeasureSides, SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'
import { planSlices } from './plan-slices.ts'

const measureInTurn: MeasureSides = async ([base, head]) => [
  await measureSide(base.inputs, base.options),
  await measureSide(head.inputs, head.options),
]

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
      dropColumns: { top: settings.dropColumnTop, also: dropAlso.slice(0, settings.singleFeatureMaxExtra) },
    },
    ...(model.kind === 'builtin' ? { builtin: { task: settings.task, settings: settings.learner } } : {}),
  }
}

/** Both sides' refits and importances, through the adapter's `measureSides` (default: in turn, here). */
export function measureBothSides(
  base: SideInputs,
  head: SideInputs,
  settings: GateSettings,
  metric: Metric,
  options: {
    readonly measureSides?: MeasureSides
    readonly onProgress?: (event: GateProgress) => void
    /** Features the pull request adds or changes: refitted without on the head (changed ones on the base too). */
    readonly touched?: { readonly added: readonly string[]; readonly changed: readonly string[] }
  },
): Promise<readonly [SideMeasurement, SideMeasurement]> {
  const added = options.touched?.added ?? []
  const changed = options.touched?.changed ?? []
  const jobs = [
    measureJob('base', base, settings, metric, options.onProgress, changed),
    measureJob('head', head, settings, metric, options.onProgress, [...added, ...changed]),
  ] as const
  return (options.measureSides ?? measureInTurn)(jobs)
}
