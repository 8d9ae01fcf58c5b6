/**
 * A cache client that keeps its entries in a folder, with the behaviour of @actions/cache that the
 * action relies on: an entry is the files of `paths` under a key; a restore with other paths misses
 * (the service's version is a hash of the paths); a key once saved is never written again (the
 * service refuses the reservation and saveCache returns -1); saving a path that does not exist
 * throws. Its failures are real file-system failures: point `root` below a regular file and every
 * restore and save fails with ENOTDIR.
 */
import { copyFile, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises'
import { dirname, join } from 'node:path'
import type { CacheClient } from '../../src/adapters/action/actions-cache-store.ts'

export function folderCacheClient(root: string, options: { available?: boolean } = {}): CacheClient & { readonly keys: () => Promise<string[]> } {
  let nextId = 1
  const entry = (key: string) => join(root, encodeURIComponent(key))
  return {
    isFeatureAvailable: () => options.available ?? true,
    async restoreCache(paths, key) {
      const folder = entry(key)
      const found = await stat(folder).catch((error: NodeJS.ErrnoException) => {
        if (error.code === 'ENOENT') return null
        throw error
      })
      if (!found) return undefined
      const saved = JSON.parse(await readFile(join(folder, 'paths.json'), 'utf8')) as string[]
      if (JSON.stringify(saved) !== JSON.stringify(paths)) return undefined
      for (const [k, path] of paths.entries()) {
        await mkdir(dirname(path), { recursive: true })
        await copyFile(join(folder, String(k)), path)
      }
      return key
    },
    async saveCache(paths, key) {
      for (const path of paths) {
        if (!(await stat(path).catch(() => null))) throw new Error(`Path Validation Error: ${path} does not exist, hence no cache is being saved.`)
      }
      const folder = entry(key)
      await mkdir(root, { recursive: true })
      if (await stat(folder).catch(() => null)) return -1
      const temporary = `${folder}.partial`
      await rm(temporary, { recursive: true, force: true })
      await mkdir(temporary)
      for (const [k, path] of paths.entries()) await copyFile(path, join(temporary, String(k)))
      await writeFile(join(temporary, 'paths.json'), JSON.stringify(paths))
      await rename(temporary, folder)
      return nextId++
    },
    async keys() {
      return (await readdir(root).catch(() => [] as string[])).map((name) => decodeURIComponent(name)).sort()
    },
  }
}
