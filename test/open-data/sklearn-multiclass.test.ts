/**
 * `task: multiclass` end to end through the CLI (main()) on open data nobody here wrote: the wine
 * table (178 rows, 13 features, three cultivars) that scikit-learn ships, read from Debian's
 * python3-sklearn (1.2.1) at /usr/lib/python3/dist-packages/sklearn/datasets/data/wine_data.csv
 * (a header line "178,13,class_0,class_1,class_2", then 13 features and the class 0, 1 or 2). The
 * target is written as the class names class_0, class_1, class_2 (text labels, as a user's file
 * would have them). Each case is a pull request on a throwaway git repository with a fixed 75/25
 * split (every fourth row held out) and a policy with default checks:
 * - a label copy (the class index, with 5% of rows given another class at random) is added: blocks,
 *   and the finding names the feature;
 * - a column that gives away one class only (1 for class_2, 0 otherwise, plus noise of SD 0.1) is
 *   added: blocks, the finding naming the feature and the class its one-vs-rest AUC belongs to;
 * - a column of pure noise is added: passes with no leakage finding.
 * Without python3-sklearn the suite is skipped (its name says which package is missing).
 */
import { afterAll, describe, expect, it } from 'vitest'
import type { GateReport } from '../../src/core/report/report.ts'
import { createRandom } from '../../src/core/statistics/random.ts'
import { checkInProcess } from '../helpers/check-in-process.ts'
import { makeRepository, type TestRepository } from '../helpers/make-repository.ts'
import { hasWine as hasSklearn, readWine as wine, wineCsvText as csv } from '../helpers/wine-table.ts'

const policy = 'version: 1\ntask: multiclass\ntarget: cultivar\nseed: 3\ndata:\n  train: data/train.csv\n  holdout: data/holdout.csv\nmodel:\n  builtin:\n    learner: gradient-boosting\n'

const repositories: TestRepository[] = []
afterAll(() => repositories.forEach((r) => r.remove()))

async function check(change: 'copy-5' | 'noise' | 'one-class'): Promise<GateReport> {
  const table = wine()
  const all = table.target.map((_, i) => i)
  const holdout = all.filter((i) => i % 4 === 0)
  const train = all.filter((i) => i % 4 !== 0)
  const random = createRandom(change === 'noise' ? 11 : change === 'copy-5' ? 12 : 13)
  const values =
    change === 'noise'
      ? table.target.map(() => random.normal())
      : change === 'copy-5'
        ? table.target.map((y) => (random.next() >= 0.05 ? y : (y + 1 + random.int(2)) % 3))
        : table.target.map((y) => (y === 2 ? 1 : 0) + 0.1 * random.normal())
  const extra = { name: change === 'noise' ? 'batch_noise' : change === 'copy-5' ? 'lab_grade' : 'cask_flag', values }
  const repository = makeRepository({
    base: { 'plumbline.yml': policy, 'data/train.csv': csv(table, train), 'data/holdout.csv': csv(table, holdout) },
    head: { 'data/train.csv': csv(table, train, extra), 'data/holdout.csv': csv(table, holdout, extra) },
  })
  repositories.push(repository)
  return checkInProcess(repository.root)
}

describe.skipIf(!hasSklearn)("task: multiclass on scikit-learn's wine table (needs Debian's python3-sklearn)", () => {
  it('blocks a label copy (the class, 5% of rows given another) and names it first', async () => {
    const report = await check('copy-5')
    expect(report.settings.task).toBe('multiclass')
    expect(report.settings.classes).toEqual(['class_0', 'class_1', 'class_2'])
    expect(report.settings.metric).toBe('log-loss')
    expect(report.verdict).toBe('block')
    expect(report.headline).toMatch(/^Blocked: lab_grade, new here,/)
  })

  it('blocks a column that gives away one class only (class_2 flagged, with noise), naming that class', async () => {
    // cask_flag is 1 + noise for class_2 and 0 + noise otherwise (SD 0.1): it tells class_2 from the
    // rest almost perfectly and cannot tell class_0 from class_1, so the per-class one-vs-rest AUC
    // of its one-feature model is what flags it.
    const report = await check('one-class')
    expect(report.verdict).toBe('block')
    const leak = report.findings.find((f) => f.kind === 'leakage' && f.feature === 'cask_flag')
    expect(leak?.severity).toBe('block')
    expect(leak?.title).toMatch(/alone separates the holdout \(one-vs-rest AUC [0-9.]+ for the class 'class_2'\)\.$/)
    expect(leak?.evidence).toMatchObject({ singleFeatureClass: 'class_2' })
  })

  it('passes a column of pure noise with no leakage finding', async () => {
    const report = await check('noise')
    expect(report.findings.filter((f) => f.kind === 'leakage')).toEqual([])
    expect(report.verdict).toBe('pass')
  })
})
