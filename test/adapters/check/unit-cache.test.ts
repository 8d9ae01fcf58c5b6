/**
 * The unit cache (--cache): a second check reads every unit from the folder and gives the report a
 * fresh one gives (apart from timings and the cache field); an entry whose digest does not match
 * its unit is never used; a new head commit reuses the base side's units only.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runCheck } from '../../../src/adapters/check/run-check.ts'
import { renderText } from '../../../src/core/report/render-text.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { baseFiles, makeParcels, parcelsCsv, smallPolicy, type TestRepository, makeRepository } from '../../helpers/make-repository.ts'
import { deterministic } from '../../helpers/deterministic-report.ts'

describe('plumbline check --cache DIR', () => {
  let repo: TestRepository
  let cache: string
  let fresh: GateReport
  beforeAll(async () => {
    repo = makeRepository({ base: baseFiles({ policy: smallPolicy() }) })
    cache = mkdtempSync(join(tmpdir(), 'plumbline-cache-'))
    fresh = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr' })
  }, 120_000)
  afterAll(() => {
    repo.remove()
    rmSync(cache, { recursive: true, force: true })
  })

  it('measures every unit once, then reads them all back, with the report of a fresh check', async () => {
    const first = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(first.cache?.reused).toEqual([])
    expect(first.cache?.measured.length).toBe(readdirSync(cache).length)
    const second = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(second.cache?.measured).toEqual([])
    expect([...(second.cache?.reused ?? [])].sort()).toEqual([...(first.cache?.measured ?? [])].sort())
    expect(deterministic(second)).toBe(deterministic(fresh))
    expect(deterministic(first)).toBe(deterministic(fresh))
    expect(renderText(second)).toContain(`Work units from the cache: ${second.cache?.reused.length} of ${second.cache?.reused.length} (base/refit-1, base/refit-2`)
  }, 120_000)

  it('never uses an entry whose key or unit does not match: that unit is measured again', async () => {
    const [name] = readdirSync(cache).sort()
    const entry = JSON.parse(readFileSync(join(cache, name), 'utf8'))
    writeFileSync(join(cache, name), JSON.stringify({ ...entry, key: 'f'.repeat(64) }))
    const again = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(again.cache?.measured).toEqual([entry.id])
    expect(deterministic(again)).toBe(deterministic(fresh))
    // Rewritten with its own key now.
    expect(JSON.parse(readFileSync(join(cache, name), 'utf8')).key).toBe(name.replace('.json', ''))
  }, 120_000)

  it('after a push that changes the head data, takes the base side from the cache and measures the head', async () => {
    const more = makeParcels(1200, 424242)
    writeFileSync(join(repo.root, 'data/train.csv'), parcelsCsv(more))
    repo.git('commit', '--quiet', '-am', 'new training rows')
    const pushed = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr', cache })
    expect(pushed.cache?.reused.length).toBeGreaterThan(0)
    expect(pushed.cache?.reused.every((id) => id.startsWith('base/'))).toBe(true)
    expect(pushed.cache?.measured.some((id) => id.startsWith('head/'))).toBe(true)
    const afresh = await runCheck({ cwd: repo.root, baseRef: 'main', headRef: 'pr' })
    expect(deterministic(pushed)).toBe(deterministic(afresh))
  }, 120_000)
})
