import type { SideResult } from '../checks/side-result.ts'
import { dropColumnImportance, type DropColumnEstimate } from '../importance/drop-column-importance.ts'
import { lossOfScore } from '../metrics/loss-of-score.ts'
import type { MetricName } from '../metrics/metric.ts'
import type { SeparationResult } from '../importance/single-feature-separation.ts'
import type { SideMeasurement } from '../measure-side.ts'
import type { SideInputs } from './gate-inputs.ts'

/** What the checks read of a side: its measurement and one-feature models, as plain numbers. */
export function sideResult(side: 'base' | 'head', data: SideInputs, measured: SideMeasurement, single: SeparationResult, metric: MetricName): SideResult {
  const losses = measured.scores.map((s) => lossOfScore(metric, s))
  const dropColumns: Record<string, DropColumnEstimate> = Object.create(null)
  for (const d of measured.dropColumns ?? []) {
    dropColumns[d.name] = dropColumnImportance(losses, d.scores.map((s) => lossOfScore(metric, s)))
  }
  return {
    losses,
    dropColumns,
    side,
    features: data.train.features.map((f) => ({ name: f.name, kind: f.kind })),
    scores: measured.scores,
    separation: measured.separation,
    importances: measured.importances,
    perRefit: measured.perRefit,
    singleFeatureSeparation: single.overall,
    singleFeatureSlices: single.bestSlice,
    ...(single.bestClass ? { singleFeatureClasses: single.bestClass } : {}),
    noiseCovers: measured.noiseCovers,
  }
}
