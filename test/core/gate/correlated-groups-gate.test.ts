import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { testPolicy } from './test-policy.ts'
import { parseGateReport } from '../../../src/core/report/report-schema.ts'
import { runGate, type SideInputs } from '../../../src/core/run-gate.ts'
import { createRandom } from '../../../src/core/statistics/random.ts'

// Invented courier rows (this test only): the delay in minutes is 3 per km of distance plus noise;
// the head adds route_km, the same distance from another system (x + tiny noise).
function side(ref: string, withCopy: boolean): SideInputs {
  const random = createRandom(8)
  const header = ['parcel_id', 'distance_km', ...(withCopy ? ['route_km'] : []), 'stops', 'delay_min']
  const rows = [header.join(',')]
  for (let i = 0; i < 2500; i++) {
    const distance = 30 * random.next()
    const copy = distance + 0.001 * random.normal()
    const stops = random.int(20)
    const delay = 3 * distance + 0.5 * stops + 8 * random.normal()
    rows.push([`P${i}`, distance.toFixed(4), ...(withCopy ? [copy.toFixed(4)] : []), stops, delay.toFixed(3)].join(','))
  }
  const train = parseCsv(rows.slice(0, 2001).join('\n'), { source: `${ref}:train.csv`, target: 'delay_min', task: 'regression', roles: { parcel_id: 'id' } })
  const holdout = parseCsv([header.join(','), ...rows.slice(2001)].join('\n'), { source: `${ref}:holdout.csv`, schema: schemaOf(train) })
  return { ref, commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

const config = testPolicy('', { task: 'regression', target: 'delay_min', metric: 'mae', trees: 80, seed: 4 })

describe('automatic correlated groups in the gate', () => {
  it('groups x with x + tiny noise, finds the group matters while the credit is split, and says the copy is carried by the group', async () => {
    const report = await runGate({ config, policySource: 'plumbline.yml', policyChanged: false, base: side('base', false), head: side('head', true), toolVersion: 'test' })
    expect(report.groups).toEqual([{ name: 'distance_km ~ route_km', members: ['distance_km', 'route_km'], automatic: true, weakestLink: expect.any(Number) }])
    expect(report.groups![0].weakestLink!).toBeGreaterThan(0.999)
    const row = (name: string) => report.features.find((f) => f.name === name)!.head!
    const group = row('distance_km ~ route_km')
    // Permuted alone, each copy leaves the other to carry the distance: together they are worth far more.
    expect(group.isAboveFloor).toBe(true)
    expect(row('distance_km').mean + row('route_km').mean).toBeLessThan(group.mean)
    const carried = report.findings.filter((f) => f.kind === 'group-carried')
    expect(carried).toHaveLength(1)
    expect(carried[0].severity).toBe('info')
    expect(carried[0].title).toMatch(/carried by (its|their) correlated group: distance_km, route_km\.$/)
    expect(carried[0].message).toContain('route_km is new or changed here: redundant with the rest of the group, not harmless.')
    // The group holds the added route_km, so it is refitted without both copies at once: that loses
    // much, while refitting without either copy alone loses no more than reseed noise.
    expect(group.dropColumn?.isAboveNoise).toBe(true)
    expect(row('route_km').dropColumn?.isAboveNoise).toBe(false)
    expect(row('distance_km').dropColumn?.isAboveNoise).toBe(false)
    expect(carried[0].message).toMatch(/refitted without one at a time, distance_km by [-0-9.e]+ \(within reseed noise\), route_km by [-0-9.e]+ \(within reseed noise\)/)
    // distance_km now shares its work with route_km, so it moves the predictions about half as much: the
    // group explains it, so that shift is info, not a warning.
    const shift = report.findings.find((f) => f.kind === 'sensitivity-shift' && f.feature === 'distance_km')
    if (shift) expect(shift.severity).toBe('info')
    expect(parseGateReport(JSON.parse(JSON.stringify(report)), 'report.json').groups).toEqual(report.groups)
  })
})
