/**
 * A folder of unit results keyed by their digest (`--cache DIR` on check and shard): a unit whose
 * entry is there, readable and written for exactly its key and id is taken from it; every other unit
 * is executed and its entry written (to a temporary name, then renamed, so a half-written entry is
 * never read). An entry that does not match is never used. The executor records which units came
 * from the folder, for the report.
 *
 * A `store` (the action's @actions/cache) carries entries between machines: before the folder is
 * read, it is asked to put there the entries it holds for the units' keys; after new entries are
 * written, it is given their keys to keep. It never throws: a store that fails only costs the units
 * it could not supply, which are measured here.
 */
import { access, readFile, rename, rm, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { UserError } from '../../core/errors.ts'
import { cacheEntryText, readCacheEntry } from '../../core/gate/unit-files.ts'
import type { ExecuteUnits, UnitResult, WorkUnit } from '../../core/gate/work-units.ts'
import type { MeasureJob } from '../../core/run-gate.ts'
import { unitCacheKey, type SideCacheIdentity } from './input-digest.ts'
import { makeFolder } from '../files/make-folder.ts'

export interface UnitCache {
  readonly execute: ExecuteUnits
  /** Ids of the units read from the folder, and of those measured (and written), in execution order. */
  readonly used: { readonly reused: string[]; readonly measured: string[]; readonly uncacheable: string[] }
}

/** Entries kept elsewhere, by key; the file of a key is `<key>.json` in the cache folder. */
export interface UnitCacheStore {
  /** Puts into `directory` the entries it holds among `keys`; warns and returns on a failure, never throws. */
  restore(directory: string, keys: readonly string[]): Promise<void>
  /** Keeps the entries of `keys`, just written to `directory`; warns and returns on a failure, never throws. */
  save(directory: string, keys: readonly string[]): Promise<void>
}

export async function createUnitCache(options: {
  readonly directory: string
  readonly store?: UnitCacheStore
  readonly toolVersion: string
  readonly identities: { readonly base: SideCacheIdentity | 'uncacheable'; readonly head: SideCacheIdentity | 'uncacheable' }
  readonly execute: ExecuteUnits
}): Promise<UnitCache> {
  try {
    await makeFolder(options.directory)
  } catch (error) {
    throw new UserError(
      `Could not use --cache ${options.directory}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}.`,
      'Name a folder you can write to (it is created if missing).',
    )
  }
  const used = { reused: [] as string[], measured: [] as string[], uncacheable: [] as string[] }
  const keyOf = (unit: WorkUnit, job: MeasureJob) => unitCacheKey(options.toolVersion, unit, job, options.identities[unit.side])
  const execute: ExecuteUnits = async (units, context) => {
    const keys = units.map((unit) => keyOf(unit, context.jobs[unit.side === 'base' ? 0 : 1]))
    if (options.store) {
      const wanted = keys.filter((key): key is string => key !== undefined)
      const absent = (await Promise.all(wanted.map(async (key) => ((await access(join(options.directory, `${key}.json`)).then(() => true, () => false)) ? null : key)))).filter((key) => key !== null)
      if (absent.length > 0) await options.store.restore(options.directory, absent)
    }
    const found: (UnitResult | undefined)[] = await Promise.all(
      units.map(async (unit, k) => {
        const key = keys[k]
        if (!key) return undefined
        const text = await readFile(join(options.directory, `${key}.json`), 'utf8').catch(() => undefined)
        return text === undefined ? undefined : readCacheEntry(text, key, unit.id)
      }),
    )
    const missing = units.filter((_, k) => !found[k])
    const measured = missing.length > 0 ? await options.execute(missing, context) : []
    let next = 0
    const results = units.map((unit, k) => {
      if (found[k]) {
        used.reused.push(unit.id)
        return found[k]
      }
      ;(keys[k] ? used.measured : used.uncacheable).push(unit.id)
      return measured[next++]
    })
    const written: string[] = []
    for (const [k, unit] of units.entries()) {
      const key = keys[k]
      if (found[k] || !key) continue
      const path = join(options.directory, `${key}.json`)
      const temporary = `${path}.${process.pid}.tmp`
      try {
        await writeFile(temporary, cacheEntryText(key, unit, results[k]))
        await rename(temporary, path)
        written.push(key)
      } catch (error) {
        await rm(temporary, { force: true })
        throw new UserError(
          `Could not write to --cache ${options.directory}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}.`,
          'Name a folder you can write to, on a disk with room.',
        )
      }
    }
    if (options.store && written.length > 0) await options.store.save(options.directory, written)
    return results
  }
  return { execute, used }
}
