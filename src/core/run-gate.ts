/**
 * The gate on one screen: both sides measured, the checks run on the numbers, one GateReport out.
 * Pure: the adapters read files, run git and training commands, and pass the results in. Each stage
 * is a function of its own module; this file only says in which order they run.
 */
import type { GateInputs } from './gate/gate-inputs.ts'
import { measureBothSides } from './gate/measure-both-sides.ts'
import { planMeasurement } from './gate/plan-measurement.ts'
import { runChecks } from './gate/run-checks.ts'
import { separateSingleFeatures } from './gate/separate-single-features.ts'
import { sideResult } from './gate/side-results.ts'
import { createStopwatch } from './gate/stopwatch.ts'
import { judgeViews } from './gate/judge-views.ts'
import { assembleReport } from './report/assemble-report.ts'
import type { GateReport } from './report/report.ts'

export type { GateInputs, GateProgress, MeasureJob, MeasureSides, SideInputs, SideModel } from './gate/gate-inputs.ts'

export async function runGate(inputs: GateInputs): Promise<GateReport> {
  const { settings, metric, sides, capped, featureSet, changed, jobs } = planMeasurement(inputs)
  const stopwatch = createStopwatch(inputs.now)
  const measured = await stopwatch.time('measureSeconds', () => measureBothSides(jobs, inputs.measureSides))
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
    scoredTarget: sides.base.holdout.target!.values,
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
