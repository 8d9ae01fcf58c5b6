/**
 * The unit cache kept between runs in the GitHub Actions cache (the action's `cache: true`): one
 * cache entry per work unit, its key `plumbline-unit-<the unit's digest>` (the digest `--cache DIR`
 * names its files by: the tool version, the unit, its side's data, settings and, for a training
 * command or an ONNX file, the commit), holding the one file `<digest>.json` of the local cache
 * folder. Entries are immutable, as the Actions cache is: a key once saved is never written again.
 * The folder is RUNNER_TEMP/plumbline-unit-cache, and the service versions an entry by the paths it
 * holds, so an entry is found again on runners whose RUNNER_TEMP is the same path (every
 * GitHub-hosted runner; a self-hosted runner in another folder measures afresh).
 *
 * Every failure of the service (no cache service in this run, a refused reservation, a network
 * error, a quota) is a warning: the units it could not supply are measured, and the check runs.
 */
import { join } from 'node:path'
import type { UnitCacheStore } from '../check/unit-cache.ts'

/** The part of @actions/cache the store uses (its signatures), passed in so tests give a real folder-backed one. */
export interface CacheClient {
  /** Whether this run has a cache service at all (@actions/cache's isFeatureAvailable). */
  isFeatureAvailable(): boolean
  /** The key restored, or undefined on a miss. */
  restoreCache(paths: string[], primaryKey: string): Promise<string | undefined>
  /** The id of the saved entry; -1 when the service declined it. */
  saveCache(paths: string[], key: string): Promise<number>
}

export const cacheKeyPrefix = 'plumbline-unit-'
/** Requests to the cache service at a time: a shard's units are a few dozen, each one small file. */
const concurrency = 4

export interface CacheTally {
  restored: number
  missed: number
  saved: number
  failed: number
}

/**
 * A UnitCacheStore over `client`; `warn` gets one line per round that had failures (never a file's
 * contents), `info` one line per restore and save round; `tally` counts over the run.
 */
export function createActionsCacheStore(options: {
  readonly client: CacheClient
  readonly warn: (message: string) => void
  readonly info: (message: string) => void
}): UnitCacheStore & { readonly tally: CacheTally } {
  const { client, warn, info } = options
  const tally: CacheTally = { restored: 0, missed: 0, saved: 0, failed: 0 }
  let available: boolean | null = null
  const isAvailable = () => {
    if (available !== null) return available
    try {
      available = client.isFeatureAvailable()
    } catch (error) {
      available = false
      warn(`The Actions cache could not be used: ${messageOf(error)}. Every unit is measured in this job; the check still runs.`)
      return available
    }
    if (!available) warn("Input 'cache' is true, but this run has no Actions cache service (ACTIONS_CACHE_URL or ACTIONS_RESULTS_URL is not set). Every unit is measured in this job; the check still runs.")
    return available
  }
  /** One call per unit, at most `concurrency` at a time; one warning for the round's failures. */
  const round = async (what: 'restore' | 'save', directory: string, keys: readonly string[], call: (paths: string[], key: string) => Promise<boolean>) => {
    let done = 0
    const failures: string[] = []
    await eachLimited(keys, async (key) => {
      try {
        if (await call([join(directory, `${key}.json`)], `${cacheKeyPrefix}${key}`)) done += 1
      } catch (error) {
        failures.push(`${cacheKeyPrefix}${key}: ${messageOf(error)}`)
      }
    })
    tally.failed += failures.length
    if (failures.length > 0) {
      warn(
        `Could not ${what} ${failures.length} of ${keys.length} unit entr${keys.length === 1 ? 'y' : 'ies'} ${what === 'restore' ? 'from' : 'to'} the Actions cache (first: ${failures[0]}). ` +
          `${what === 'restore' ? 'Those units are measured here instead' : 'A later run measures those units again'}; the check still runs.`,
      )
    }
    return done
  }
  return {
    tally,
    async restore(directory, keys) {
      if (!isAvailable()) return
      const restored = await round('restore', directory, keys, async (paths, key) => (await client.restoreCache(paths, key)) === key)
      tally.restored += restored
      tally.missed += keys.length - restored
      info(`Actions cache: ${restored} of ${keys.length} unit entr${keys.length === 1 ? 'y' : 'ies'} restored.`)
    },
    async save(directory, keys) {
      if (!isAvailable()) return
      const saved = await round('save', directory, keys, async (paths, key) => (await client.saveCache(paths, key)) !== -1)
      tally.saved += saved
      info(`Actions cache: ${saved} of ${keys.length} new unit entr${keys.length === 1 ? 'y' : 'ies'} saved.`)
    },
  }
}

function messageOf(error: unknown): string {
  return (error instanceof Error ? error.message : String(error)).split('\n')[0]
}

async function eachLimited<T>(items: readonly T[], body: (item: T) => Promise<void>): Promise<void> {
  let next = 0
  const lane = async () => {
    while (next < items.length) await body(items[next++])
  }
  await Promise.all(Array.from({ length: Math.min(concurrency, items.length) }, lane))
}
