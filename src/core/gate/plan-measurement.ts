import { changedFeatures, diffFeatureSets } from '../checks/feature-set.ts'
import { metricByName } from '../metrics/metric-by-name.ts'
import type { GateInputs } from './gate-inputs.ts'
import { capSideRows } from './cap-side-rows.ts'
import { gateSettings } from './gate-settings.ts'
import { measureJobs } from './measure-both-sides.ts'
import { withCorrelatedGroups } from './with-correlated-groups.ts'

/**
 * What the gate measures, before anything is measured: the settings, both sides (the head's holdout
 * aligned to the base's, and the row caps applied), the feature-set diff, and both sides' measurement requests. runGate starts
 * here; `plumbline plan` and `shard` stop after it, so every run plans the same units.
 */
export function planMeasurement(inputs: Pick<GateInputs, 'config' | 'base' | 'head' | 'onProgress'>) {
  const settings = withCorrelatedGroups(gateSettings(inputs.config), inputs.head.train)
  const metric = metricByName(settings.metric, settings.task)
  // The head's holdout aligned to the base's, then the policy's row caps (cap-side-rows.ts).
  const capped = capSideRows(inputs, settings)
  const sides = capped.sides
  const featureSet = diffFeatureSets(sides.base.train, sides.head.train)
  const changed = changedFeatures(sides.base, sides.head)
  const jobs = measureJobs(sides.base, sides.head, settings, metric, {
    onProgress: inputs.onProgress,
    touched: { added: featureSet.added, changed: [...changed] },
  })
  return { settings, metric, sides, capped, featureSet, changed, jobs }
}
