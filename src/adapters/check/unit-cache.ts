/**
 * A folder of unit results keyed by their digest (`--cache DIR` on check and shard): a unit whose
 * entry is there, readable and written for exactly its key and id is taken from it; every other unit
 * is executed and its entry written (to a temporary name, then renamed, so a half-written entry is
 * never read). An entry that does not match is never used. The executor records which units came
 * from the folder, for the report.
 */
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { UserError } from '../../core/errors.ts'
import { cacheEntryText, readCacheEntry } from '../../core/gate/unit-files.ts'
import type { ExecuteUnits, UnitResult, WorkUnit } from '../../core/gate/work-units.ts'
import type { MeasureJob } from '../../core/run-gate.ts'
import { unitCacheKey, type SideCacheIdentity } from './input-digest.ts'

export interface UnitCache {
  readonly execute: ExecuteUnits
  /** Ids of the units read from the folder, and of those measured (and written), in execution order. */
  readonly used: { readonly reused: string[]; readonly measured: string[]; readonly uncacheable: string[] }
}

export async function createUnitCache(options: {
  readonly directory: string
  readonly toolVersion: string
  readonly identities: { readonly base: SideCacheIdentity | 'uncacheable'; readonly head: SideCacheIdentity | 'uncacheable' }
  readonly execute: ExecuteUnits
}): Promise<UnitCache> {
  try {
    await mkdir(options.directory, { recursive: true })
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
    for (const [k, unit] of units.entries()) {
      const key = keys[k]
      if (found[k] || !key) continue
      const path = join(options.directory, `${key}.json`)
      const temporary = `${path}.${process.pid}.tmp`
      try {
        await writeFile(temporary, cacheEntryText(key, unit, results[k]))
        await rename(temporary, path)
      } catch (error) {
        await rm(temporary, { force: true })
        throw new UserError(
          `Could not write to --cache ${options.directory}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}.`,
          'Name a folder you can write to, on a disk with room.',
        )
      }
    }
    return results
  }
  return { execute, used }
}
