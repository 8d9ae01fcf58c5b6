import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { testPolicy } from './test-policy.ts'
import { parseGateReport } from '../../../src/core/report/report-schema.ts'
import { renderMarkdown } from '../../../src/core/report/render-markdown.ts'
import { runGate, type SideInputs } from '../../../src/core/run-gate.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

const policy = testPolicy

function side(ref: string, csv: string[], trainRows: number, unlabeled?: string[]): SideInputs {
  const [header, ...rows] = csv
  const train = parseCsv([header, ...rows.slice(0, trainRows)].join('\n'), { source: `${ref}:train.csv`, target: 'late', task: 'binary', roles: { parcel_id: 'id' } })
  const holdout = parseCsv([header, ...rows.slice(trainRows)].join('\n'), { source: `${ref}:holdout.csv`, schema: schemaOf(train) })
  const extra = unlabeled ? { unlabeled: parseCsv(unlabeled.join('\n'), { source: `${ref}:recent.csv`, schema: schemaOf(train), requireTarget: false }) } : {}
  return { ref, commit: null, train, holdout, reference: train, ...extra, model: { kind: 'builtin' } }
}

// The null case of Strobl, Boulesteix, Zeileis & Hothorn (2007), BMC Bioinformatics 8:25, section
// "Simulation studies" (null case): predictors with 2, 4, 10 and 20 equally likely categories and one
// continuous U(0,1) predictor, and a binary response independent of all of them. Their finding:
// impurity (gain) importance ranks the predictors by their number of possible split points, the
// continuous one and the 20-category one highest, although none is informative. Invented courier
// column names; the sizes (1500 training and 500 holdout rows) are ours.
function strobl(withContinuous: boolean): string[] {
  const random = createRandom(17)
  const header = ['parcel_id', 'a2', 'a4', 'a10', 'a20', ...(withContinuous ? ['c'] : []), 'late']
  const rows = [header.join(',')]
  for (let i = 0; i < 2000; i++) {
    const levels = [2, 4, 10, 20].map((k) => `L${random.int(k)}`)
    const c = random.next()
    const late = random.int(2)
    rows.push([`P${i}`, ...levels, ...(withContinuous ? [c.toFixed(6)] : []), late].join(','))
  }
  return rows
}

describe('judgeViews: the built-in gain beside permutation importance (Strobl et al. 2007, null case)', () => {
  it('ranks the high-cardinality features highest by gain, finds nothing by permutation, and says the gain fits noise', async () => {
    const report = await runGate({
      config: policy(),
      policySource: 'plumbline.yml',
      policyChanged: false,
      base: side('base', strobl(false), 1500),
      head: side('head', strobl(true), 1500),
      toolVersion: 'test',
    })
    // No permutation finding: nothing above the floor, no leak, no shift, no score change.
    for (const kind of ['leakage', 'rank-shift', 'rank-agreement', 'score-regression']) {
      expect(report.findings.filter((f) => f.kind === kind && f.severity !== 'info'), kind).toEqual([])
    }
    for (const row of report.features.filter((r) => !r.isGroup)) expect(row.head?.isAboveFloor, row.name).toBe(false)

    const rank = Object.fromEntries(report.gain!.features.map((f) => [f.name, f.head!.rank]))
    // Gain orders the uninformative features by their number of split points, as Strobl et al. found.
    expect(rank.c).toBe(1)
    expect(rank.a20).toBe(2)
    expect(rank.a10).toBe(3)
    expect(rank.a4).toBe(4)
    expect(rank.a2).toBe(5)
    const noise = report.findings.filter((f) => f.kind === 'gain-noise')
    // The continuous column is new on the head: warn. a20 and a10 were there before: info.
    expect(noise.map((f) => [f.feature, f.severity])).toEqual([
      ['c', 'warn'],
      ['a20', 'info'],
      ['a10', 'info'],
    ])
    expect(noise[0].title).toMatch(/^c ranks 1 by the trees' gain \(\d+(\.\d)?%\) but is indistinguishable from zero on the holdout: the trees fit training noise with it\.$/)
    // None of them looks like an identifier (a measurement in [0, 1); 20 and 10 levels over 1,500 rows).
    for (const f of noise) expect(f.title, f.feature).not.toContain('identifier')
    expect(report.verdict).toBe('warn')
    const markdown = renderMarkdown(report)
    expect(markdown).toContain('<summary>Prediction sensitivity and gain</summary>')
    expect(markdown).toContain('favours continuous and high-cardinality features (Strobl, Boulesteix, Zeileis &amp; Hothorn 2007)')
    // The JSON contract reads it back.
    expect(parseGateReport(JSON.parse(JSON.stringify(report)), 'report.json').gain).toEqual(report.gain)
  })
})

// Invented courier rows: lateness rises steeply with distance and mildly with stops. The unlabeled
// sample is the far end of the routes (31–32 km), where a parcel is late almost whatever its stops.
function courier(seed: number, rows: number, distance?: () => number): string[] {
  const random = createRandom(seed)
  const out = ['parcel_id,distance_km,stops,late']
  for (let i = 0; i < rows; i++) {
    const d = distance ? distance() : 2 + 30 * random.next()
    const stops = random.int(25)
    const late = random.next() < 1 / (1 + Math.exp(-(-4 + 0.25 * d + 0.05 * stops))) ? 1 : 0
    out.push([`P${seed}-${i}`, d.toFixed(2), stops, late].join(','))
  }
  return out
}

describe('judgeViews: prediction sensitivity on unlabeled rows', () => {
  it('reports stops moving the predictions much less on the unlabeled rows than on the holdout, and no shift between equal sides', async () => {
    const far = createRandom(99)
    const recent = courier(98, 600, () => 31 + far.next()).map((line, i) => (i === 0 ? 'parcel_id,distance_km,stops' : line.replace(/,[01]$/, '')))
    const data = courier(5, 2000)
    const report = await runGate({
      config: policy(),
      policySource: 'plumbline.yml',
      policyChanged: false,
      base: side('base', data, 1500, recent),
      head: side('head', data, 1500, recent),
      toolVersion: 'test',
    })
    expect(report.sensitivity!.threshold).toBe(0.5)
    expect(report.sensitivity!.unlabeledRows).toEqual({ base: 600, head: 600 })
    expect(report.findings.filter((f) => f.kind === 'sensitivity-shift')).toEqual([])
    const unlabeled = report.findings.filter((f) => f.kind === 'sensitivity-unlabeled')
    const stops = unlabeled.find((f) => f.feature === 'stops')!
    expect(stops.title).toMatch(/^On the unlabeled rows stops moves the candidate's predictions less than on the holdout/)
    expect(Number(stops.evidence.ratio)).toBeLessThanOrEqual(0.5)
    const row = report.sensitivity!.features.find((f) => f.name === 'stops')!
    expect(row.head!.unlabeled!.perRefit).toHaveLength(3)
    expect(row.change!.isSignificant).toBe(false)
  })
})
