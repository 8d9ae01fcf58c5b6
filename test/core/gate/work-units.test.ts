import { describe, expect, it } from 'vitest'
import { UserError } from '../../../src/core/errors.ts'
import { encodeUnit, partialFormat, readCacheEntry, cacheEntryText, readPartialFile } from '../../../src/core/gate/unit-files.ts'
import { assignShards, type DropGroupUnit, type RefitUnit, type UnitResult } from '../../../src/core/gate/work-units.ts'

const unit = (cost: number, k: number): RefitUnit => ({ kind: 'refit', id: `u${k}`, side: 'base', refit: k, seed: k, cost })

describe('assignShards(units, shards)', () => {
  it("gives the longest-processing-time schedule of Graham's tight example (makespan 15 against the best 12)", () => {
    // Graham (1969), "Bounds on multiprocessing timing anomalies": with m = 4 machines, jobs
    // 7, 7, 6, 6, 5, 5, 4, 4, 4 take 4m - 1 = 15 under LPT while the best schedule takes 3m = 12
    // (7+5, 7+5, 6+6, 4+4+4). From memory of the paper's worked bound, checked by hand below.
    const costs = [7, 7, 6, 6, 5, 5, 4, 4, 4]
    const shards = assignShards(costs.map(unit), 4)
    expect(shards.map((list) => list.map((u) => u.cost))).toEqual([
      [7, 4, 4],
      [7, 4],
      [6, 5],
      [6, 5],
    ])
    expect(Math.max(...shards.map((list) => list.reduce((s, u) => s + u.cost, 0)))).toBe(15)
  })

  it('keeps plan order within a shard, leaves extra shards empty, and refuses a count below 1', () => {
    expect(assignShards([unit(1, 0), unit(3, 1), unit(2, 2)], 1)[0].map((u) => u.id)).toEqual(['u0', 'u1', 'u2'])
    expect(assignShards([unit(1, 0)], 3).map((list) => list.length)).toEqual([1, 0, 0])
    expect(() => assignShards([], 0)).toThrow('assignShards needs a whole number of shards from 1, got 0')
  })
})

describe('partial result files and cache entries', () => {
  const awkward = [0.1 + 0.2, -0, NaN, Infinity, -Infinity, 5e-324, 1.7976931348623157e308, -1 / 3]
  const result: UnitResult = {
    kind: 'refit',
    part: {
      score: awkward[0],
      separation: -0,
      importances: [{ name: 'distance_km', members: ['distance_km'], isGroup: false, draws: awkward, mean: NaN, sd: NaN, lower: -Infinity, upper: Infinity, rowSe: 5e-324 }],
      predictions: Float64Array.from(awkward),
      model: { kind: 'gradient-boosting', featureNames: ['distance_km'], engine: 'plumbline-trees' },
      slices: [],
    },
  }
  const refit: RefitUnit = { kind: 'refit', id: 'base/refit-1', side: 'base', refit: 0, seed: 42, cost: 1 }
  const digest = 'ab'.repeat(32)
  const file = {
    ...partialFormat,
    digest,
    inputs: { toolVersion: '0.1.0', policy: digest, base: { commit: 'c'.repeat(40), data: digest }, head: { commit: null, data: digest } },
    shard: { stage: 'refits', index: 1, of: 1 },
    units: [encodeUnit(refit, result)],
  }

  it('reads back every double bit for bit, NaN, -0 and the infinities included, in the same key order', () => {
    const back = readPartialFile(JSON.stringify(file), 'p.json').units[0].result
    expect(back.kind).toBe('refit')
    if (back.kind !== 'refit' || result.kind !== 'refit') return
    const bits = (values: ArrayLike<number>) => Array.from(Float64Array.from(values as number[]), (x) => new BigUint64Array(Float64Array.of(x).buffer)[0])
    expect(bits(back.part.predictions)).toEqual(bits(result.part.predictions))
    expect(bits(back.part.importances[0].draws)).toEqual(bits(awkward))
    expect(Object.is(back.part.separation, -0)).toBe(true)
    expect(Object.keys(back.part)).toEqual(Object.keys(result.part))
    expect(Object.keys(back.part.importances[0])).toEqual(Object.keys(result.part.importances[0]))
  })

  it('refuses another format, another version and an unknown key, naming the file and the key', () => {
    const message = (text: string) => {
      try {
        readPartialFile(text, 'shard/p.json')
      } catch (error) {
        return error instanceof UserError ? `${error.message} | ${error.fix}` : String(error)
      }
      return 'read'
    }
    expect(message('{"format":"other"}')).toBe(
      'shard/p.json is not a plumbline partial result file (its "format" is "other", not "plumbline-partial"). | Pass the folders plumbline shard --out wrote, and nothing else.',
    )
    expect(message(JSON.stringify({ ...file, version: 2 }))).toBe(
      'shard/p.json is a partial result file of version 2; this plumbline reads version 1. | Run the shards and the merge with the same plumbline version.',
    )
    expect(message(JSON.stringify({ ...file, extra: 1 }))).toBe(
      'shard/p.json is not a valid partial result file: (the top level): Unrecognized key: "extra". | Run plumbline shard again to rewrite it; partial files are not meant to be edited.',
    )
    expect(message('{')).toMatch(/^shard\/p\.json is not JSON \(/)
  })

  it('reads back a drop-group unit with its group, its members and its score', () => {
    const unit: DropGroupUnit = { kind: 'drop-group', id: 'head/refit-2/without-group/route', side: 'head', refit: 1, seed: 9, group: 'route', members: ['distance_km', 'stop_count'], cost: 1 }
    const stage2 = { ...file, shard: { stage: 'drop-columns', index: 1, of: 1 }, units: [encodeUnit(unit, { kind: 'drop-column', score: -0 })] }
    const [back] = readPartialFile(JSON.stringify(stage2), 'p.json').units
    expect(back).toMatchObject({ id: unit.id, kind: 'drop-group', side: 'head', refit: 1, seed: 9, group: 'route', members: ['distance_km', 'stop_count'] })
    expect(back.result.kind === 'drop-column' && Object.is(back.result.score, -0)).toBe(true)
    const text = cacheEntryText(digest, unit, { kind: 'drop-column', score: 0.25 })
    expect(readCacheEntry(text, digest, unit.id)).toEqual({ kind: 'drop-column', score: 0.25 })
  })

  it('uses a cache entry only for its own key and unit', () => {
    const text = cacheEntryText(digest, refit, result)
    expect(readCacheEntry(text, digest, 'base/refit-1')?.kind).toBe('refit')
    expect(readCacheEntry(text, 'cd'.repeat(32), 'base/refit-1')).toBeUndefined()
    expect(readCacheEntry(text, digest, 'base/refit-2')).toBeUndefined()
    expect(readCacheEntry(text.slice(0, 40), digest, 'base/refit-1')).toBeUndefined()
  })
})
