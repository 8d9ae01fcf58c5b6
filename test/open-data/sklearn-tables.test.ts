/**
 * The leak judgment on open data nobody here wrote: the breast-cancer (569 rows, 30 features, binary)
 * and diabetes (442 rows, 10 features, regression) tables that scikit-learn ships, read from Debian's
 * python3-sklearn (1.2.1+dfsg-1 here) under /usr/lib/python3/dist-packages/sklearn/datasets/data/.
 * Each case is a pull request on a throwaway git repository with a fixed 75/25 split (every fourth
 * row held out), a policy with default checks, checked by the real CLI (main()):
 * - a label copy with 5% and with 8% of values flipped (binary) or swapped with another row's
 *   target (regression) is added: must block;
 * - the post-outcome proxy 2·label + 0.3·z(first feature) + N(0, 1) is added: must block;
 * - a column of pure noise is added: must pass with no leakage finding;
 * - the holdout rows are written in another order, with no id column: must pass (matched by content).
 * Without python3-sklearn the suite is skipped (its name says which package is missing).
 */
import { existsSync, readFileSync } from 'node:fs'
import { gunzipSync } from 'node:zlib'
import { afterAll, describe, expect, it } from 'vitest'
import type { GateReport } from '../../src/core/report/report.ts'
import { createRandom } from '../../src/core/statistics/random.ts'
import { checkInProcess } from '../helpers/check-in-process.ts'
import { makeRepository, type TestRepository } from '../helpers/make-repository.ts'

const dataDir = '/usr/lib/python3/dist-packages/sklearn/datasets/data'
const hasSklearn = existsSync(`${dataDir}/breast_cancer.csv`) && existsSync(`${dataDir}/diabetes_data_raw.csv.gz`)

interface Table {
  readonly task: 'binary' | 'regression'
  readonly names: readonly string[]
  readonly rows: readonly (readonly number[])[]
  readonly target: readonly number[]
}

/** breast_cancer.csv: a header line "569,30,malignant,benign", then 30 features and the class (0 malignant, 1 benign). */
function breastCancer(): Table {
  const lines = readFileSync(`${dataDir}/breast_cancer.csv`, 'utf8').trim().split('\n').slice(1)
  const stems = ['radius', 'texture', 'perimeter', 'area', 'smoothness', 'compactness', 'concavity', 'concave_points', 'symmetry', 'fractal_dimension']
  const names = ['mean', 'error', 'worst'].flatMap((p) => stems.map((s) => `${p}_${s}`))
  const values = lines.map((l) => l.split(',').map(Number))
  return { task: 'binary', names, rows: values.map((v) => v.slice(0, 30)), target: values.map((v) => v[30]) }
}

/** diabetes_data_raw.csv.gz (10 space-separated columns, unscaled) and diabetes_target.csv.gz. */
function diabetes(): Table {
  const read = (file: string) => gunzipSync(readFileSync(`${dataDir}/${file}`)).toString('utf8').trim().split('\n')
  const rows = read('diabetes_data_raw.csv.gz').map((l) => l.trim().split(/\s+/).map(Number))
  const target = read('diabetes_target.csv.gz').map(Number)
  return { task: 'regression', names: ['age', 'sex', 'bmi', 'bp', 's1', 's2', 's3', 's4', 's5', 's6'], rows, target }
}

function csv(table: Table, indices: readonly number[], extra?: { name: string; values: readonly number[] }): string {
  const header = [...table.names, ...(extra ? [extra.name] : []), 'outcome']
  const lines = indices.map((i) => [...table.rows[i], ...(extra ? [Number(extra.values[i].toFixed(4))] : []), table.target[i]].join(','))
  return `${header.join(',')}\n${lines.join('\n')}\n`
}

function policy(task: 'binary' | 'regression'): string {
  return `version: 1\ntask: ${task}\ntarget: outcome\nseed: 3\ndata:\n  train: data/train.csv\n  holdout: data/holdout.csv\nmodel:\n  builtin:\n    learner: gradient-boosting\n`
}

type Change = 'copy-5' | 'copy-8' | 'proxy' | 'noise' | 'reordered-holdout'

const repositories: TestRepository[] = []
afterAll(() => repositories.forEach((r) => r.remove()))

async function check(table: Table, change: Change): Promise<GateReport> {
  const all = table.target.map((_, i) => i)
  const holdout = all.filter((i) => i % 4 === 0)
  const train = all.filter((i) => i % 4 !== 0)
  const random = createRandom(change.length * 31 + table.rows.length)
  let head: Record<string, string>
  if (change === 'reordered-holdout') {
    const order = [...holdout]
    for (let i = order.length - 1; i > 0; i--) {
      const j = random.int(i + 1)
      ;[order[i], order[j]] = [order[j], order[i]]
    }
    head = { 'data/holdout.csv': csv(table, order) }
  } else {
    // The post-outcome proxy: 2·label + 0.3·z(first feature) + N(0, 1) (regression: the label standardized).
    const z = (values: readonly number[]) => {
      const m = values.reduce((t, v) => t + v, 0) / values.length
      const sd = Math.sqrt(values.reduce((t, v) => t + (v - m) ** 2, 0) / (values.length - 1))
      return values.map((v) => (v - m) / sd)
    }
    const first = z(table.rows.map((r) => r[0]))
    const label = table.task === 'binary' ? table.target : z(table.target)
    const values =
      change === 'noise'
        ? table.target.map(() => random.normal())
        : change === 'proxy'
          ? label.map((y, i) => 2 * y + 0.3 * first[i] + random.normal())
          : table.target.map((y) => {
            if (random.next() >= (change === 'copy-5' ? 0.05 : 0.08)) return y
            return table.task === 'binary' ? 1 - y : table.target[random.int(table.target.length)]
          })
    const extra = { name: change === 'noise' ? 'batch_noise' : 'followup_score', values }
    head = { 'data/train.csv': csv(table, train, extra), 'data/holdout.csv': csv(table, holdout, extra) }
  }
  const repository = makeRepository({
    base: { 'plumbline.yml': policy(table.task), 'data/train.csv': csv(table, train), 'data/holdout.csv': csv(table, holdout) },
    head,
  })
  repositories.push(repository)
  return checkInProcess(repository.root)
}

const tables = hasSklearn ? [['breast cancer', breastCancer()] as const, ['diabetes', diabetes()] as const] : []

describe.skipIf(!hasSklearn)("open data from scikit-learn's bundled tables (needs Debian's python3-sklearn)", () => {
  describe.each(tables)('%s', (_, table) => {
    it.each(['copy-5', 'copy-8'] as const)('blocks the label copy %s (that percentage of values flipped or swapped) and names it first', async (change) => {
      const report = await check(table, change)
      expect(report.verdict).toBe('block')
      expect(report.headline).toMatch(/^Blocked: followup_score, new here,/)
    })

    it('blocks the post-outcome proxy 2·label + 0.3·z(first feature) + N(0, 1)', async () => {
      const report = await check(table, 'proxy')
      expect(report.verdict).toBe('block')
      expect(report.headline).toMatch(/^Blocked: followup_score, new here,/)
    })

    it('passes a column of pure noise with no leakage finding', async () => {
      const report = await check(table, 'noise')
      expect(report.findings.filter((f) => f.kind === 'leakage')).toEqual([])
      expect(report.verdict).toBe('pass')
    })

    it('does not block holdout rows written in another order without an id column', async () => {
      const report = await check(table, 'reordered-holdout')
      expect(report.verdict).toBe('pass')
      expect(report.findings.filter((f) => f.kind === 'holdout-rows')).toEqual([])
    })
  })
})
