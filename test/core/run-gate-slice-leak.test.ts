import { describe, expect, it } from 'vitest'
import { parseCsv } from '../../src/core/data/parse-csv.ts'
import { parsePolicy } from '../../src/core/policy/parse-policy.ts'
import { runGate, type SideInputs } from '../../src/core/run-gate.ts'
import { createRandom } from '../../src/core/statistics/random.ts'
import { schemaOf } from '../../src/core/data/parse-csv.ts'

// A courier table where one depot's scanner writes the outcome into `depot_flag`: the value is the
// label there and noise everywhere else. Invented data for this test only.
function tables(withLeak: boolean, seed: number) {
  const random = createRandom(seed)
  const depots = ['harbour', 'airport', 'ringway', 'north-park', 'old-town']
  const header = ['parcel_id', 'depot', 'distance_km', 'stops', ...(withLeak ? ['depot_flag'] : []), 'late']
  const rows: string[] = [header.join(',')]
  for (let i = 0; i < 2000; i++) {
    const depot = depots[random.int(depots.length)]
    const distance = 2 + 30 * random.next()
    const stops = random.int(25)
    const logit = -1 + 0.05 * distance + 0.04 * stops
    const late = random.next() < 1 / (1 + Math.exp(-logit)) ? 1 : 0
    const flag = depot === 'harbour' ? late + 0.01 * random.normal() : random.next()
    rows.push([`P${i}`, depot, distance.toFixed(2), stops, ...(withLeak ? [flag.toFixed(3)] : []), late].join(','))
  }
  return rows
}

function side(withLeak: boolean, ref: string): SideInputs {
  const rows = tables(withLeak, 5)
  const header = rows[0]
  const train = parseCsv([header, ...rows.slice(1, 1501)].join('\n'), { source: `${ref}:train.csv`, target: 'late', task: 'binary', roles: { parcel_id: 'id' } })
  const holdout = parseCsv([header, ...rows.slice(1501)].join('\n'), { source: `${ref}:holdout.csv`, schema: schemaOf(train) })
  return { ref, commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

const policy = parsePolicy(
  `version: 1
task: binary
target: late
seed: 3
data:
  train: train.csv
  holdout: holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
    trees: 60
importance:
  refits: 3
  draws: 3
`,
  { source: 'plumbline.yml' },
)

describe('runGate on a leak confined to one slice', () => {
  it('blocks a new feature that gives the label away inside one depot only', async () => {
    const report = await runGate({ config: policy, policySource: 'plumbline.yml', policyChanged: false, base: side(false, 'base'), head: side(true, 'head'), toolVersion: 'test' })
    const leak = report.findings.find((f) => f.kind === 'leakage' && f.feature === 'depot_flag')
    expect(report.verdict).toBe('block')
    expect(leak?.evidence.sliceColumn).toBe('depot')
    expect(leak?.evidence.sliceValue).toBe('harbour')
    // On the whole holdout the flag is far from the line: the slice is what gives it away.
    expect(Number(leak?.evidence.singleFeatureSeparation)).toBeLessThan(0.95)
  })
})
