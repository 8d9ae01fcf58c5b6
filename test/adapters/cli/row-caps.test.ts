/**
 * Row caps end to end: `plumbline check` on a generated repository whose training table has 200,000
 * invented parcels and whose holdout has 60,000 (test/helpers/make-repository.ts), under the default
 * caps of 100,000 training and 50,000 holdout rows. A small learner (20 trees of depth 3, 2 refits ×
 * 2 draws) keeps the run short; the caps themselves are the policy defaults.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { main } from '../../../src/adapters/cli/main.ts'
import { parseGateReport } from '../../../src/core/report/report-schema.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { deriveSeed } from '../../../src/core/statistics/random.ts'
import { makeParcels, makeRepository, parcelsCsv, smallPolicy, type TestRepository } from '../../helpers/make-repository.ts'

// The generated repositories' small policy, with fewer trees, refits and draws; the caps are its defaults.
const policy = smallPolicy({ seed: 11 }).replace('trees: 60', 'trees: 20').replace('draws: 3', 'draws: 2').replace('refits: 3', 'refits: 2')

let repo: TestRepository
let code: number
let stderr = ''
beforeAll(async () => {
  const parcels = makeParcels(260_000, 20261202)
  repo = makeRepository({
    base: { 'plumbline.yml': policy, 'data/train.csv': parcelsCsv(parcels.slice(0, 200_000)), 'data/holdout.csv': parcelsCsv(parcels.slice(200_000)) },
  })
  const saved = process.env.PLUMBLINE_THREADS
  process.env.PLUMBLINE_THREADS = '1'
  try {
    code = await main(['check', '--base', 'main', '--head', 'pr', '--json', 'out/report.json', '--markdown', 'out/comment.md', '--html', 'out/report.html'], {
      cwd: repo.root,
      stdout: () => undefined,
      stderr: (t) => (stderr += t),
      isTty: false,
    })
  } finally {
    if (saved === undefined) delete process.env.PLUMBLINE_THREADS
    else process.env.PLUMBLINE_THREADS = saved
  }
}, 300_000)
afterAll(() => repo?.remove())

const trainSeed = deriveSeed(11, 'row-cap', 'train')
const holdoutSeed = deriveSeed(11, 'row-cap', 'holdout')

describe('plumbline check on a 200,000-row training table', () => {
  it('completes under the default caps, and the JSON report records both samples on both sides', () => {
    expect(code).toBe(0)
    const path = join(repo.root, 'out/report.json')
    const report: GateReport = parseGateReport(JSON.parse(readFileSync(path, 'utf8')), path)
    for (const side of [report.sides!.base, report.sides!.head]) {
      expect(side).toMatchObject({ trainRows: 100_000, holdoutRows: 50_000 })
      expect(side.rowSampling).toEqual({
        train: { rows: 200_000, kept: 100_000, seed: trainSeed },
        holdout: { rows: 60_000, kept: 50_000, seed: holdoutSeed },
      })
    }
    expect(stderr).toContain('base: 200000 training rows (a sample of 100000 by data.max_train_rows), 60000 holdout rows (a sample of 50000 by data.max_holdout_rows), 5 features')
  })

  it('says so in the comment and the HTML report', () => {
    const lines = [
      `Training rows sampled (data.max_train_rows): 200,000 → 100,000 with seed ${trainSeed}, on both sides.`,
      `Holdout rows sampled (data.max_holdout_rows): 60,000 → 50,000 with seed ${holdoutSeed}, on both sides.`,
    ]
    const comment = readFileSync(join(repo.root, 'out/comment.md'), 'utf8')
    // In the visible part of the comment, before the first collapsed section.
    const visible = comment.split('\n<details>')[0]
    // Markdown escapes the underscores of the key: data.max\_train\_rows.
    for (const line of lines) expect(visible).toContain(line.replace(/_/g, '\\_'))
    const html = readFileSync(join(repo.root, 'out/report.html'), 'utf8')
    for (const line of lines) expect(html).toContain(line)
  })
})
