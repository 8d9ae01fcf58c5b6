/**
 * The gate on one screen: both sides measured, the checks run on the numbers, one GateReport out.
 * Pure: the adapters read files, run git and training commands, and pass the results in. Each stage
 * is a function of its own module; this file only says in which order they run.
 */
import { changedFeatures, diffFeatureSets } from './checks/feature-set.ts'
import { capSideRows } from './gate/cap-side-rows.ts'
import type { GateInputs } from './gate/gate-inputs.ts'
import { gateSettings } from './gate/gate-settings.ts'
import { measureBothSides } from './gate/measure-both-sides.ts'
import { runChecks } from './gate/run-checks.ts'
import { separateSingleFeatures } from './gate/separate-single-features.ts'
import { sideResult } from './gate/side-results.ts'
import { createStopwatch } from './gate/stopwatch.ts'
import { judgeViews } from './gate/judge-views.ts'
import { withCorrelatedGroups } from './gate/with-correlated-groups.ts'
import { metricByName } from './metrics/metric-by-name.ts'
import { assembleReport } from './report/assemble-report.ts'
import type { GateReport } from './report/report.ts'

export type { GateInputs, GateProgress, MeasureJob, MeasureSides, SideInputs, SideModel } from './gate/gate-inputs.ts'

export async function runGate(inputs: GateInputs): Promise<GateReport> {
  const settings = withCorrelatedGroups(gateSettings(inputs.config), inputs.head.train)
  const metric = metricByName(settings.metric, settings.task)
  const stopwatch = createStopwatch(inputs.now)
  const capped = capSideRows(inputs, settings)
  const sides = capped.sides

  const featureSet = diffFeatureSets(sides.base.train, sides.head.train)
  const changed = changedFeatures(sides.base, sides.head)
  const measured = await stopwatch.time('measureSeconds', () =>
    measureBothSides(sides.base, sides.head, settings, metric, {
      measureSides: inputs.measureSides,
      onProgress: inputs.onProgress,
      touched: { added: featureSet.added, changed: [...changed] },
    }),
  )
  const single = await separateSingleFeatures(sides, measured, [...featureSet.added, ...changed], settings, {
    stopwatch,
    onProgress: inputs.onProgress,
  })

  inputs.onProgress?.({ stage: 'checks' })
  const results = {
    base: sideResult('base', sides.base, measured[0], single.base, metric.name),
    head: sideResult('head', sides.head, measured[1], single.head, metric.name),
  }
  const views = judgeViews({ settings, sides, measured, results, touched: new Set([...featureSet.added, ...changed]) })
  const checked = runChecks({
    viewFindings: views.findings,
    settings,
    metric,
    holdouts: capped.holdouts,
    measured,
    results,
    featureSet,
    changed,
    policyChanged: inputs.policyChanged,
    policySource: inputs.policySource,
  })
  return assembleReport({
    toolVersion: inputs.toolVersion,
    policySource: inputs.policySource,
    settings,
    metric,
    sides,
    rowSampling: capped.sampling,
    measured,
    results,
    featureSet,
    ...checked,
    views,
    timings: stopwatch.timings,
  })
}
