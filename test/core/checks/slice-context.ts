/**
 * The slice findings' test context, shared by slice-findings.test.ts and
 * slice-findings-words.test.ts: a floored importance unit, the options, and the overall ranking.
 */
import type { FlooredImportance } from '../../../src/core/importance/compute-noise-floor.ts'
import { defaultChecks } from '../../../src/core/policy/policy-defaults.ts'

export const unit = (name: string, mean: number, isAboveFloor = true, isGroup = false): FlooredImportance => ({
  name,
  members: isGroup ? ['distance_km', 'stops'] : [name],
  isGroup,
  mean,
  refitSd: 0.01,
  drawSd: 0.01,
  lower: isAboveFloor ? mean / 2 : -0.01,
  upper: mean * 1.5 + 0.01,
  isAboveFloor,
  perRefit: [mean],
})
export const options = { ...defaultChecks.slices, metric: 'auc', higherIsBetter: true, alpha: 0.06, dominanceShare: 0.5, runnerUpRatio: 3 }
export const overall = [unit('distance_km', 0.2), unit('stops', 0.1), unit('rain_mm', 0.05)]
