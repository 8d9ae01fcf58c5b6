import { rankFeatures } from '../checks/side-result.ts'
import type { SideMeasurement } from '../measure-side.ts'
import { createBuiltinFit } from '../models/builtin-fit.ts'
import { singleFeatureSeparation, type SeparationResult } from '../importance/single-feature-separation.ts'
import type { GateProgress, SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'
import type { Stopwatch } from './stopwatch.ts'

/**
 * One-feature models for the features a leak could hide in: the top of each side's ranking and
 * everything the pull request added or changed; the same names on both sides, scored on each side's
 * holdout (and within its slices).
 */
export async function separateSingleFeatures(
  sides: { readonly base: SideInputs; readonly head: SideInputs },
  measured: readonly [SideMeasurement, SideMeasurement],
  touched: readonly string[],
  settings: GateSettings,
  context: { readonly stopwatch: Stopwatch; readonly onProgress?: (event: GateProgress) => void },
): Promise<{ readonly base: SeparationResult; readonly head: SeparationResult }> {
  const [base, head] = measured
  const candidates = [
    ...new Set<string>([
      ...rankFeatures(head.importances).slice(0, settings.singleFeatureTop).map((u) => u.name),
      ...rankFeatures(base.importances).slice(0, settings.singleFeatureTop).map((u) => u.name),
      ...touched.slice(0, settings.singleFeatureMaxExtra),
    ]),
  ]
  const separate = (side: 'base' | 'head') =>
    context.stopwatch.time(`${side}SingleFeatureSeconds`, async () => {
      context.onProgress?.({ stage: 'single-feature', side, features: candidates.length })
      const data = sides[side]
      return singleFeatureSeparation(data.train, data.holdout, candidates, {
        fit: createBuiltinFit(data.train, settings.task, settings.singleFeatureLearner),
        task: settings.task,
        seed: settings.seed,
        side,
        slices: settings.slices,
        withSliceColumn: touched,
      })
    })
  const baseResult = await separate('base')
  const headResult = await separate('head')
  return { base: baseResult, head: headResult }
}
