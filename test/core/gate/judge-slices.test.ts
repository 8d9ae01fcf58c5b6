import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { UserError } from '../../../src/core/errors.ts'
import { testPolicy } from './test-policy.ts'
import { parseGateReport } from '../../../src/core/report/report-schema.ts'
import { renderMarkdown } from '../../../src/core/report/render-markdown.ts'
import { runGate, type SideInputs } from '../../../src/core/run-gate.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

const policy = (slices: string) => testPolicy(`slices:
${slices}`)

// Invented courier rows (this test only). Lateness grows with distance everywhere; at the airport depot
// it is decided by the number of stops instead. `scramble` makes the head's distance_km noise at the
// ringway depot (a broken join there); `flag` adds depot_flag, the label itself at the harbour depot.
function side(ref: string, options: { scramble?: boolean; flag?: boolean } = {}): SideInputs {
  const random = createRandom(21)
  const depots = ['harbour', 'airport', 'ringway', 'north-park', 'old-town']
  const header = ['parcel_id', 'depot', 'distance_km', 'stops', ...(options.flag ? ['depot_flag'] : []), 'late']
  const rows = [header.join(',')]
  for (let i = 0; i < 4000; i++) {
    const depot = depots[random.int(depots.length)]
    const distance = 2 + 30 * random.next()
    const stops = random.int(25)
    const logit = depot === 'airport' ? 0.5 * (stops - 12) : -2.5 + 0.15 * distance
    const late = random.next() < 1 / (1 + Math.exp(-logit)) ? 1 : 0
    const noise = 2 + 30 * random.next()
    const shown = options.scramble && depot === 'ringway' ? noise : distance
    const flag = depot === 'harbour' ? late : random.int(2)
    rows.push([`P${i}`, depot, shown.toFixed(2), stops, ...(options.flag ? [flag] : []), late].join(','))
  }
  const train = parseCsv(rows.slice(0, 2001).join('\n'), { source: `${ref}:train.csv`, target: 'late', task: 'binary', roles: { parcel_id: 'id' } })
  const holdout = parseCsv([header.join(','), ...rows.slice(2001)].join('\n'), { source: `${ref}:holdout.csv`, schema: schemaOf(train) })
  return { ref, commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

const gate = (slices: string, base: SideInputs, head: SideInputs) =>
  runGate({ config: policy(slices), policySource: 'plumbline.yml', policyChanged: false, base, head, toolVersion: 'test' })

describe('judgeSlices: the policy slices of the holdout', () => {
  it('finds the score regression inside one slice, the feature that carries the model in another, and a slice too small to judge', async () => {
    const report = await gate(
      `  - name: ringway
    where: { column: depot, equals: ringway }
  - name: airport
    where: { column: depot, in: [airport] }
  - name: longest routes
    where: { all_of: [ { column: distance_km, at_least: 31 }, { column: depot, equals: harbour } ] }
`,
      side('base'),
      side('head', { scramble: true }),
    )
    const slices = Object.fromEntries(report.slices!.map((s) => [s.name, s]))
    expect(slices.ringway.definition).toBe('depot = ringway')
    expect(slices['longest routes'].definition).toBe('distance_km ≥ 31 and depot = harbour')
    expect(slices['longest routes'].status).toBe('too-small')
    expect(slices.ringway.rows.head).toBe(slices.ringway.rows.base)
    expect(slices.ringway.rows.head).toBeGreaterThanOrEqual(200)
    expect(slices.ringway.scoreChange!.worsening).toBeGreaterThan(0)
    const kinds = report.findings.map((f) => `${f.kind}:${f.feature}:${f.severity}`)
    expect(kinds).toContain('slice-score:ringway:warn')
    expect(kinds).not.toContain('slice-score:airport:warn')
    // At the airport stops decides lateness: it carries the model there (info: the pull request did not touch it).
    expect(kinds).toContain('slice-dominance:stops:info')
    expect(kinds).toContain('slice-too-small:longest routes:info')
    expect(slices.airport.head!.top[0].name).toBe('stops')
    expect(parseGateReport(JSON.parse(JSON.stringify(report)), 'report.json').slices).toEqual(report.slices)
    const markdown = renderMarkdown(report)
    expect(markdown).toContain('<summary>Slices</summary>')
    expect(markdown).toMatch(/\| ringway: depot = ringway \| \d+ \| [\d.]+ → [\d.]+ \\\* \| [^|]+ \| *$/m)
  })

  it('reports a new feature that carries the model inside one slice only', async () => {
    const report = await gate(`  - name: harbour\n    where: { column: depot, equals: harbour }\n`, side('base'), side('head', { flag: true }))
    const dominance = report.findings.find((f) => f.kind === 'slice-dominance')!
    expect(dominance.feature).toBe('depot_flag')
    expect(dominance.severity).toBe('warn')
    expect(Number(dominance.evidence.share)).toBeGreaterThanOrEqual(0.5)
    expect(Number(dominance.evidence.overallShare)).toBeLessThan(0.5)
    // The base lacks nothing here; a base without the column a slice names just has no value for it.
    expect(report.slices![0].base!.top.map((t) => t.name)).not.toContain('depot_flag')
  })

  it('refuses a slice naming a column the head does not have, naming the slice and the key', async () => {
    const run = gate(`  - name: vans\n    where: { column: van_type, equals: small }\n`, side('base'), side('head'))
    await expect(run).rejects.toThrow(UserError)
    await expect(run).rejects.toThrow(
      "The slice 'vans' (slices[0].where) names the column 'van_type', which is not a feature of head:holdout.csv (features: depot, distance_km, stops).",
    )
  })
})
