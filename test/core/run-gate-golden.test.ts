import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../src/core/data/parse-csv.ts'
import { parsePolicy } from '../../src/core/policy/parse-policy.ts'
import { runGate, type SideInputs } from '../../src/core/run-gate.ts'
import { createRandom } from '../../src/core/statistics/random.ts'

// A fixed scenario whose whole JSON report is kept in test/core/golden/: a refactor that changes no
// behaviour leaves it byte for byte the same (timings aside). A deliberate change of judgment or
// wording updates the file with `npx vitest run test/core/run-gate-golden.test.ts -u`, and the diff
// of that file is reviewed with the change. Invented courier rows for this test only.
const random = createRandom(23)
const header = 'parcel_id,distance_km,stops,depot,weight_kg,late,scan_delay_h'
const lines: string[] = []
for (let i = 0; i < 1400; i++) {
  const distance = 2 + 30 * random.next()
  const stops = random.int(25)
  const depot = ['north', 'south', 'east'][random.int(3)]
  const weight = 0.5 + 20 * random.next()
  const late = random.next() < 1 / (1 + Math.exp(-(-1.8 + 0.07 * distance + 0.04 * stops + (depot === 'east' ? 0.6 : 0)))) ? 1 : 0
  const scanDelay = late ? 1 + 3 * random.next() : random.next() < 0.08 ? 1 + random.next() : -random.next()
  lines.push(`P${i},${distance.toFixed(2)},${stops},${depot},${weight.toFixed(1)},${late},${scanDelay.toFixed(2)}`)
}
const policy = parsePolicy(
  'version: 1\ntask: binary\ntarget: late\nseed: 5\ndata:\n  train: t.csv\n  holdout: h.csv\n  columns:\n    parcel_id: id\nmodel:\n  builtin:\n    learner: gradient-boosting\n    trees: 40\nimportance:\n  refits: 3\n  draws: 3\n',
  { source: 'plumbline.yml' },
)

function side(columns: readonly string[]): SideInputs {
  const all = header.split(',')
  const keep = all.map((name, j) => (columns.includes(name) ? j : -1)).filter((j) => j >= 0)
  const table = (from: number, to: number) =>
    [keep.map((j) => all[j]).join(','), ...lines.slice(from, to).map((line) => keep.map((j) => line.split(',')[j]).join(','))].join('\n')
  const train = parseCsv(table(0, 1000), { source: 't.csv', target: 'late', task: 'binary', roles: { parcel_id: 'id' } })
  const holdout = parseCsv(table(1000, 1400), { source: 'h.csv', schema: schemaOf(train) })
  return { ref: 'x', commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

describe('runGate on a fixed scenario (a leak added, a weak feature removed)', () => {
  it('gives the JSON report kept in test/core/golden/leak-added.json', async () => {
    const report = await runGate({
      config: policy,
      policySource: 'plumbline.yml',
      policyChanged: false,
      base: side(['parcel_id', 'distance_km', 'stops', 'depot', 'weight_kg', 'late']),
      head: side(['parcel_id', 'distance_km', 'stops', 'depot', 'late', 'scan_delay_h']),
      toolVersion: 'test',
    })
    expect(report.verdict).toBe('block')
    await expect(JSON.stringify({ ...report, timings: {} }, null, 2) + '\n').toMatchFileSnapshot('golden/leak-added.json')
  })
})
