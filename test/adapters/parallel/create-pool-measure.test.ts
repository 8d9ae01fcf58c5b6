import { describe, expect, it } from 'vitest'
import { createPoolMeasure } from '../../../src/adapters/parallel/create-pool-measure.ts'
import type { Dataset, Task } from '../../../src/core/data/dataset.ts'
import { measureSide } from '../../../src/core/measure-side.ts'
import { metricByName } from '../../../src/core/metrics/metric-by-name.ts'
import { createBuiltinFit, type BuiltinLearnerSettings } from '../../../src/core/models/builtin-fit.ts'
import type { MeasureJob } from '../../../src/core/run-gate.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

// The reference here is the one-thread measurement itself: the pool must give it bit for bit.

function table(rows: number, seed: number, task: Task, source: string): Dataset {
  const random = createRandom(seed)
  const names = ['distance_km', 'stop_count', 'hour', 'noise_a', 'noise_b']
  const columns = names.map(() => Float64Array.from({ length: rows }, () => (random.next() < 0.05 ? NaN : random.normal())))
  const values = Float64Array.from({ length: rows }, (_, i) => {
    const s = 2 * (columns[0][i] || 0) - (columns[1][i] || 0) * (columns[2][i] || 0) + 0.5 * random.normal()
    return task === 'binary' ? (s > 0 ? 1 : 0) : s
  })
  return {
    rows,
    source,
    features: names.map((name) => ({ name, kind: 'numeric' as const })),
    columns,
    missing: names.map(() => 0),
    target: { name: 'late', values },
  }
}

const settings = (learner: BuiltinLearnerSettings['learner']): BuiltinLearnerSettings => ({
  learner,
  boosting: { trees: 25, maxDepth: 4, learningRate: 0.2, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 },
  maxBins: 64,
  linearL2: 1,
})

function job(side: 'base' | 'head', task: Task, learner: BuiltinLearnerSettings['learner'], seed: number): MeasureJob {
  const train = table(500, seed, task, `${side}/train.csv`)
  const holdout = table(300, seed + 1, task, `${side}/holdout.csv`)
  const builtin = { task, settings: settings(learner) }
  return {
    inputs: { side, train, holdout, reference: train, fit: createBuiltinFit(train, task, builtin.settings) },
    options: {
      task,
      metric: metricByName(task === 'binary' ? 'log-loss' : 'rmse', task),
      seed: 17,
      refits: 4,
      draws: 3,
      groups: [{ name: 'route', members: ['stop_count', 'hour'] }],
      evaluationRows: 200, // below the holdout's 300, so the capped sample is exercised
      referenceRows: 400,
      // Drop-column refits too: the top feature and one named, each pair a job of its own on the pool;
      // and the group 'route' (it holds the named feature) with both its members left out at once.
      dropColumns: { top: 1, also: ['hour'], groupTop: 1, groupMembers: 4 },
    },
    builtin,
  }
}

describe('createPoolMeasure(environment).measureSides', () => {
  it('returns undefined below two threads (measure in turn, in process)', () => {
    expect(createPoolMeasure({ PLUMBLINE_THREADS: '1' })).toBeUndefined()
  })

  for (const [task, learner] of [['binary', 'gradient-boosting'], ['regression', 'gradient-boosting'], ['regression', 'linear']] as const) {
    it(`gives what one thread gives, bit for bit (${task}, ${learner}, 4 refits a side, a group, capped rows)`, async () => {
      const jobs = [job('base', task, learner, 1), job('head', task, learner, 1)] as const
      const progress: string[] = []
      const withProgress = jobs.map((j) => ({ ...j, options: { ...j.options, onRefit: (r: number, of: number) => progress.push(`${j.inputs.side} ${r + 1}/${of}`) } })) as unknown as typeof jobs
      const pool = createPoolMeasure({}, { threads: 2 })!
      try {
        const [base, head] = await pool.measureSides(withProgress)
        const oneThread = [await measureSide(jobs[0].inputs, jobs[0].options), await measureSide(jobs[1].inputs, jobs[1].options)]
        expect(base).toEqual(oneThread[0])
        expect(head).toEqual(oneThread[1])
        expect(base.perRefit).toHaveLength(4)
        expect(base.dropColumns.map((d) => d.name)).toContain('hour')
        expect(base.dropColumns[0].scores).toHaveLength(4)
        const group = base.dropColumns.find((d) => d.isGroup)
        expect(group).toMatchObject({ name: 'route', members: ['stop_count', 'hour'] })
        expect(group!.scores).toHaveLength(4)
        expect(progress.sort()).toEqual(['base 1/4', 'base 2/4', 'base 3/4', 'base 4/4', 'head 1/4', 'head 2/4', 'head 3/4', 'head 4/4'])
      } finally {
        await pool.close()
      }
    }, 120_000)
  }
})
