import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../src/core/data/parse-csv.ts'
import { parsePolicy } from '../../src/core/policy/parse-policy.ts'
import { runGate, type SideInputs } from '../../src/core/run-gate.ts'
import { createRandom } from '../../src/core/statistics/random.ts'

// Invented courier rows for this test only.
const random = createRandom(11)
const rows = ['parcel_id,distance_km,stops,late']
for (let i = 0; i < 1200; i++) {
  const distance = 2 + 30 * random.next()
  const stops = random.int(25)
  const late = random.next() < 1 / (1 + Math.exp(-(-1.5 + 0.06 * distance + 0.05 * stops))) ? 1 : 0
  rows.push(`P${i},${distance.toFixed(2)},${stops},${late}`)
}
const policy = parsePolicy(
  'version: 1\ntask: binary\ntarget: late\nseed: 2\ndata:\n  train: t.csv\n  holdout: h.csv\n  columns:\n    parcel_id: id\nmodel:\n  builtin:\n    learner: gradient-boosting\n    trees: 40\nimportance:\n  refits: 3\n  draws: 3\n',
  { source: 'plumbline.yml' },
)

function side(holdoutRows: string[]): SideInputs {
  const train = parseCsv([rows[0], ...rows.slice(1, 901)].join('\n'), { source: 't.csv', target: 'late', task: 'binary', roles: { parcel_id: 'id' } })
  const holdout = parseCsv([rows[0], ...holdoutRows].join('\n'), { source: 'h.csv', schema: schemaOf(train) })
  return { ref: 'x', commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

describe('runGate when the pull request only reorders the holdout file', () => {
  it('matches the rows by id and gives exactly the numbers of an unchanged holdout', async () => {
    const holdout = rows.slice(901)
    const run = (head: string[]) =>
      runGate({ config: policy, policySource: 'plumbline.yml', policyChanged: false, base: side(holdout), head: side(head), toolVersion: 'test' })
    const reordered = await run([...holdout].reverse())
    const unchanged = await run(holdout)
    expect(reordered.findings.filter((f) => f.kind === 'holdout-rows')).toEqual([])
    expect(reordered.verdict).toBe('pass')
    expect(reordered.features).toEqual(unchanged.features)
    expect(reordered.sides!.head.scores).toEqual(unchanged.sides!.head.scores)
  })
})
