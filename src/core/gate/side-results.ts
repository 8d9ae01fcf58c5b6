import type { SideResult } from '../checks/side-result.ts'
import type { SeparationResult } from '../importance/single-feature-separation.ts'
import type { SideMeasurement } from '../measure-side.ts'
import type { SideInputs } from './gate-inputs.ts'

/** What the checks read of a side: its measurement and one-feature models, as plain numbers. */
export function sideResult(side: 'base' | 'head', data: SideInputs, measured: SideMeasurement, single: SeparationResult): SideResult {
  return {
    side,
    features: data.train.features.map((f) => ({ name: f.name, kind: f.kind })),
    scores: measured.scores,
    separation: measured.separation,
    importances: measured.importances,
    perRefit: measured.perRefit,
    singleFeatureSeparation: single.overall,
    singleFeatureSlices: single.bestSlice,
    noiseCovers: measured.noiseCovers,
  }
}
