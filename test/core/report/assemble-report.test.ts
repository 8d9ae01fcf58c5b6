import { describe, expect, it } from 'vitest'
import { describeSides } from '../../../src/core/report/assemble-report.ts'
import { parseCsv } from '../../../src/core/data/parse-csv.ts'
import type { SideMeasurement } from '../../../src/core/measure-side.ts'
import type { SideInputs } from '../../../src/core/gate/gate-inputs.ts'

const train = parseCsv('distance_km,late\n1,0\n2,1\n3,0\n', { source: 't.csv', target: 'late', task: 'binary', roles: {} })
const side: SideInputs = { ref: 'main', commit: 'abc', train, holdout: train, reference: train, model: { kind: 'builtin' } }
const measured = (scores: number[]): SideMeasurement => ({
  refitSeeds: scores.map((_, i) => i),
  scores,
  separation: scores,
  importances: [],
  perRefit: [],
  evaluationRows: 3,
  referenceRows: 3,
  model: { kind: 'boosted', featureNames: ['distance_km'], engine: 'plumbline-trees' },
  firstPredictions: new Float64Array(3),
  noiseCovers: scores.length > 1 ? 'refits-and-draws' : 'draws-only',
  dropColumns: [],
})

describe('describeSides', () => {
  it('gives the per-refit score mean and the sample SD (n − 1)', () => {
    // Scores 0.40, 0.42, 0.44, 0.46, 0.48 (computed by hand): mean 0.44, squared deviations sum to
    // 0.004, sample SD sqrt(0.004 / 4) = 0.0316227766; divided by n it would be 0.0282842712.
    const sides = describeSides({ base: side, head: side }, measured([0.4, 0.42, 0.44, 0.46, 0.48]), measured([0.5]))
    expect(sides!.base.scoreMean).toBeCloseTo(0.44, 12)
    expect(sides!.base.scoreSd).toBeCloseTo(0.0316227766, 9)
    expect(sides!.head.scoreSd).toBeNaN()
    expect(sides!.base.model.description).toBe("boosted on 1 feature, evaluated by plumbline's tree evaluator")
  })
})
