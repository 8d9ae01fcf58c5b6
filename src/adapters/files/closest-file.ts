/**
 * For a data file that does not exist, the files beside where it was looked for whose names are
 * closest to the one typed ("data/trian.csv" → "data/train.csv"), for the message's fix. Reads only
 * the folder's listing, inside the folder the path was resolved in; nothing when that folder is
 * missing or unreadable.
 */
import { readdirSync } from 'node:fs'
import { basename, dirname, join, resolve } from 'node:path'
import { levenshteinDistance } from '../../core/policy/levenshtein-distance.ts'

export function closestFiles(root: string, path: string, limit = 3): string[] {
  const wanted = basename(path).toLowerCase()
  let names: string[]
  try {
    names = readdirSync(resolve(root, dirname(path)), { withFileTypes: true })
      .filter((entry) => entry.isFile())
      .map((entry) => entry.name)
  } catch {
    return []
  }
  const allowed = Math.max(2, Math.floor(wanted.length / 4))
  return names
    .map((name) => ({ name, distance: levenshteinDistance(wanted, name.toLowerCase()) }))
    .filter((candidate) => candidate.distance <= allowed)
    .sort((a, b) => a.distance - b.distance || (a.name < b.name ? -1 : 1))
    .slice(0, limit)
    .map((candidate) => (dirname(path) === '.' ? candidate.name : join(dirname(path), candidate.name)))
}
