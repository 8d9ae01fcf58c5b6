import { beforeAll, describe, expect, it } from 'vitest'
import { runOne, type RunResult } from '../../evaluation/run.ts'

// A fast subset of `npm run evaluate`: one run per family on 2 000 parcels, through the real CLI and
// its JSON report, so that a regression in detection fails CI. The expectations are the families'
// meaning (evaluation/scenarios.ts), not numbers fitted to these runs; only families that the full
// evaluation (evaluation/results.md) catches or passes in every run are held to a strict
// expectation. Run 0 of a family is binary, run 1 regression (evaluation/run.ts, runSpec).
const options = { families: [], runsPerFamily: 1, rows: [2000], jobs: 2, seed: 1 }

const plan: readonly { family: string; run: number }[] = [
  { family: 'no-op', run: 1 },
  { family: 'reseed-only', run: 0 },
  { family: 'irrelevant-added', run: 1 },
  { family: 'weak-added', run: 0 },
  { family: 'irrelevant-removed', run: 1 },
  { family: 'row-order', run: 0 },
  { family: 'label-noise', run: 0 },
  { family: 'label-noise', run: 1 },
  { family: 'post-outcome', run: 0 },
  { family: 'noisy-copy', run: 1 },
  { family: 'slice-leak-empty', run: 0 },
  { family: 'signal-removed', run: 0 },
  { family: 'transform-halved', run: 1 },
  { family: 'score-drop', run: 0 },
  { family: 'copy-strong-features', run: 0 },
  { family: 'copy-weak-features', run: 1 },
  { family: 'post-outcome-proxy', run: 0 },
  { family: 'strong-legit-added', run: 0 },
  { family: 'strong-legit-reviewed', run: 0 },
  { family: 'feature-removed', run: 1 },
  { family: 'row-order-no-ids', run: 0 },
]

const results = new Map<string, RunResult>()
const key = (family: string, run: number) => `${family}#${run}`

beforeAll(async () => {
  let next = 0
  const worker = async () => {
    while (next < plan.length) {
      const { family, run } = plan[next++]
      results.set(key(family, run), await runOne(family, run, options))
    }
  }
  await Promise.all([worker(), worker()])
}, 240_000)

function result(family: string, run: number): RunResult {
  const r = results.get(key(family, run))!
  if (r.verdict === 'error') throw new Error(`${family} #${run} failed to run:\n${r.error}`)
  return r
}

const fired = (r: RunResult) => r.findings.filter((f) => f.severity !== 'info').map((f) => `${f.severity}:${f.kind}${f.feature ? `(${f.feature})` : ''}`)

describe('npm run evaluate, fast subset (runOne through the CLI)', () => {
  it('no-op: byte-identical tables give a pass without a single warning (both sides use the same refit seeds)', () => {
    const r = result('no-op', 1)
    expect(fired(r)).toEqual([])
    expect(r.verdict).toBe('pass')
    expect(r.scoreDrop).toBe(0)
  })

  it.each([
    ['reseed-only', 0],
    ['irrelevant-added', 1],
    ['weak-added', 0],
    ['irrelevant-removed', 1],
    ['row-order', 0],
    ['feature-removed', 1],
    ['row-order-no-ids', 0],
  ])('%s (benign) does not block', (family, run) => {
    const r = result(family as string, run as number)
    expect(r.verdict, fired(r).join(' ')).not.toBe('block')
  })

  it.each([0, 1])('label-noise blocks through the leakage check on recorded_delay (run %i)', (run) => {
    const r = result('label-noise', run)
    expect(r.verdict).toBe('block')
    expect(fired(r)).toContain('block:leakage(recorded_delay)')
  })

  // final_scan_hour leaks only together with promised_by_hour, which neither one-feature separation
  // nor dominance sees; its drop-column loss does (the lift rule, docs/leak-rule.md).
  it('post-outcome blocks on final_scan_hour through the lift rule', () => {
    const r = result('post-outcome', 0)
    expect(r.verdict).toBe('block')
    expect(fired(r)).toContain('block:leakage(final_scan_hour)')
  })

  it('noisy-copy is flagged', () => {
    const r = result('noisy-copy', 1)
    expect(['warn', 'block']).toContain(r.verdict)
  })

  // The issue's target for a slice-only leak is "flagged" (warn or block); in the full evaluation
  // 8 of 20 slice-leak-empty runs blocked through the slice check and all 20 were flagged.
  it('slice-leak-empty is flagged', () => {
    const r = result('slice-leak-empty', 0)
    expect(r.verdict, fired(r).join(' ')).not.toBe('pass')
  })

  it('signal-removed blocks on the score and reports distance_km\'s shift', () => {
    const r = result('signal-removed', 0)
    expect(r.verdict).toBe('block')
    expect(fired(r)).toContain('block:score-regression')
    expect(fired(r)).toContain('warn:rank-shift(distance_km)')
  })

  it('transform-halved is flagged, and stop_count lost at least a quarter of its importance', () => {
    const r = result('transform-halved', 1)
    expect(['warn', 'block']).toContain(r.verdict)
    expect(r.focusRelativeChange!).toBeGreaterThan(0.25)
  })

  it('score-drop is flagged and the holdout score got worse by more than 2 reseed SDs', () => {
    const r = result('score-drop', 0)
    expect(['warn', 'block']).toContain(r.verdict)
    expect(r.scoreDropInSds!).toBeGreaterThan(2)
  })
})
