import { existsSync, readFileSync } from 'node:fs'
import { gunzipSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import type { Dataset } from '../../src/core/data/dataset.ts'
import { executeInProcess, measureByUnits, planDropColumnUnits, combineSides, planRefitUnits, unitContext } from '../../src/core/gate/work-units.ts'
import type { MeasureJob } from '../../src/core/gate/gate-inputs.ts'
import type { FlooredImportance } from '../../src/core/importance/compute-noise-floor.ts'
import { dropColumnImportance } from '../../src/core/importance/drop-column-importance.ts'
import { leaveOutSets, type DropColumnRequest } from '../../src/core/measure-drop-columns.ts'
import { lossOfScore } from '../../src/core/metrics/loss-of-score.ts'
import { metricByName } from '../../src/core/metrics/metric-by-name.ts'
import { createBuiltinFit, type BuiltinLearnerSettings } from '../../src/core/models/builtin-fit.ts'
import { missingReference } from '../helpers/reference-packages.ts'

const train = { features: ['a', 'b', 'c', 'd', 'e'].map((name) => ({ name, kind: 'numeric' as const })) }
const unit = (name: string, mean: number, isAboveFloor: boolean, members: readonly string[] = [name]): FlooredImportance => ({
  name,
  members,
  isGroup: members.length > 1 || name.includes('~'),
  mean,
  refitSd: 0.01,
  drawSd: 0.01,
  lower: isAboveFloor ? mean / 2 : -1,
  upper: mean * 2,
  isAboveFloor,
  perRefit: [mean, mean],
})
const request = (over: Partial<DropColumnRequest> = {}): DropColumnRequest => ({ top: 1, also: [], groupTop: 1, groupMembers: 4, ...over })

describe('leaveOutSets(train, request, groups, importances, ranked)', () => {
  const groups = [
    { name: 'a ~ b', members: ['a', 'b'] },
    { name: 'c ~ d', members: ['c', 'd'] },
    { name: 'd ~ e', members: ['d', 'e'] },
  ]
  const importances = [unit('a', 0.5, true), unit('b', 0.4, true), unit('c', 0.1, false), unit('d', 0.1, false), unit('e', 0, false), unit('a ~ b', 2, true, ['a', 'b']), unit('c ~ d', 3, true, ['c', 'd']), unit('d ~ e', 0.01, false, ['d', 'e'])]

  it('refits without the top group above the floor, then drills down into its members one by one', () => {
    // c ~ d has the largest grouped importance (3): it is the top group; its members come after the top feature a.
    expect(leaveOutSets(train, request(), groups, importances, ['a', 'b', 'c', 'd', 'e'])).toEqual([
      { name: 'a', members: ['a'], isGroup: false },
      { name: 'c', members: ['c'], isGroup: false },
      { name: 'd', members: ['d'], isGroup: false },
      { name: 'c ~ d', members: ['c', 'd'], isGroup: true },
    ])
  })

  it('always refits without a group holding an added or changed feature, but drills down only into a group above the floor', () => {
    const sets = leaveOutSets(train, request({ also: ['e'], groupTop: 0 }), groups, importances, ['a', 'b', 'c', 'd', 'e'])
    expect(sets.map((s) => s.name)).toEqual(['e', 'a', 'd ~ e'])
  })

  it('keeps the drill-down within groupMembers per group and skips a group of every feature', () => {
    const all = [{ name: 'all', members: ['a', 'b', 'c', 'd', 'e'] }, { name: 'a ~ b', members: ['a', 'b'] }]
    const floored = [...importances.slice(0, 5), unit('all', 9, true, ['a', 'b', 'c', 'd', 'e']), unit('a ~ b', 2, true, ['a', 'b'])]
    expect(leaveOutSets(train, request({ top: 0, also: ['c'], groupMembers: 1 }), all, floored, ['a', 'b', 'c', 'd', 'e']).map((s) => s.name)).toEqual(['c', 'a', 'a ~ b'])
  })

  it('refits without the top group and its members even when no single feature is asked for', () => {
    expect(leaveOutSets(train, request({ top: 0 }), groups, importances, ['a']).map((s) => s.name)).toEqual(['c', 'd', 'c ~ d'])
  })

  it('plans no group for a budget of 0 groups and no added or changed feature', () => {
    expect(leaveOutSets(train, request({ groupTop: 0 }), groups, importances, ['a']).map((s) => s.name)).toEqual(['a'])
  })
})

// The diabetes table that scikit-learn ships (Debian python3-sklearn 1.2.1+dfsg-1, 442 rows, 10 raw
// features), every fourth row held out. The linear learner is ridge on standardized features
// (fitRidge), deterministic, so the drop-column loss of every matched pair is the same number.
const dataDir = '/usr/lib/python3/dist-packages/sklearn/datasets/data'
const missing = existsSync(`${dataDir}/diabetes_data_raw.csv.gz`) ? missingReference('python3-sklearn', 'test/core/measure-drop-columns.test.ts') : 'no diabetes table'

function diabetes(keep: (i: number) => boolean, source: string): Dataset {
  const read = (file: string) => gunzipSync(readFileSync(`${dataDir}/${file}`)).toString('utf8').trim().split('\n')
  const rows = read('diabetes_data_raw.csv.gz').map((l) => l.trim().split(/\s+/).map(Number))
  const target = read('diabetes_target.csv.gz').map(Number)
  const picked = rows.map((_, i) => i).filter(keep)
  const names = ['age', 'sex', 'bmi', 'bp', 's1', 's2', 's3', 's4', 's5', 's6']
  return {
    rows: picked.length,
    source,
    features: names.map((name) => ({ name, kind: 'numeric' as const })),
    columns: names.map((_, j) => Float64Array.from(picked, (i) => rows[i][j])),
    missing: names.map(() => 0),
    target: { name: 'progression', values: Float64Array.from(picked, (i) => target[i]) },
  }
}

describe.skipIf(missing !== undefined)('grouped drop-column importance against scikit-learn refits without the columns', () => {
  it('gives the MSE increase of Ridge(alpha=1) on StandardScaler output refitted without s1 and s2, and without bmi and s5', async () => {
    const settings: BuiltinLearnerSettings = {
      learner: 'linear',
      boosting: { trees: 1, maxDepth: 1, learningRate: 0.1, minRowsPerLeaf: 1, l2: 1, rowSubsample: 1, columnSubsample: 1 },
      maxBins: 255,
      linearL2: 1,
    }
    const job = (side: 'base' | 'head'): MeasureJob => {
      const train = diabetes((i) => i % 4 !== 0, 'train')
      const holdout = diabetes((i) => i % 4 === 0, 'holdout')
      return {
        inputs: { side, train, holdout, reference: train, fit: createBuiltinFit(train, 'regression', settings) },
        options: {
          task: 'regression',
          metric: metricByName('rmse', 'regression'),
          seed: 11,
          refits: 3,
          draws: 2,
          groups: [
            { name: 'lipids', members: ['s1', 's2'] },
            { name: 'bmi and s5', members: ['bmi', 's5'] },
          ],
          evaluationRows: 1000,
          referenceRows: 1000,
          // Both groups hold a named feature, so both are refitted without whatever their permutation importance.
          dropColumns: { top: 0, also: ['s1', 'bmi'], groupTop: 0, groupMembers: 4 },
        },
        builtin: { task: 'regression', settings },
      }
    }
    const jobs = [job('base'), job('head')] as const
    const context = unitContext(jobs)
    const refits = planRefitUnits(context)
    const planned = planDropColumnUnits(context, combineSides(context, refits, await executeInProcess(refits, context)))
    expect(planned.filter((u) => u.side === 'head').map((u) => u.id)).toContain('head/refit-2/without-group/bmi and s5')
    const [, head] = await measureByUnits(jobs, executeInProcess)
    const losses = head.scores.map((s) => lossOfScore('rmse', s))
    const estimate = (name: string, isGroup: boolean) => {
      const d = head.dropColumns.find((x) => x.name === name && x.isGroup === isGroup)!
      return dropColumnImportance(losses, d.scores.map((s) => lossOfScore('rmse', s)))
    }
    // scikit-learn 1.2.1 (Debian python3-sklearn), /usr/bin/python3:
    //   make_pipeline(StandardScaler(), Ridge(alpha=1.0)) fitted on rows i % 4 != 0 with all ten
    //   features, and again without the columns; mean_squared_error on rows i % 4 == 0: full 3707.90375,
    //   without s1 and s2 +75.30175380914852, without bmi and s5 +704.0849985242553, without s1 alone
    //   +40.15500279745447 (the pair's loss is not the sum of its members' losses).
    expect(estimate('lipids', true).mean).toBeCloseTo(75.30175380914852, 6)
    expect(estimate('bmi and s5', true).mean).toBeCloseTo(704.0849985242553, 6)
    expect(estimate('s1', false).mean).toBeCloseTo(40.15500279745447, 6)
    expect(losses[0]).toBeCloseTo(3707.903746765592, 6)
  })
})
