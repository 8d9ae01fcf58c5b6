import { readFile, realpath } from 'node:fs/promises'
import { isAbsolute, relative, resolve } from 'node:path'
import type { Dataset } from '../../core/data/dataset.ts'
import { parseParquet } from '../../core/data/parse-parquet.ts'
import { UserError } from '../../core/errors.ts'
import type { ReadDatasetOptions } from './read-dataset.ts'

/**
 * Reads a Parquet file's bytes and parses them with `parseParquet`. The path must stay inside `cwd`
 * (the side's checkout), also after symbolic links are followed. A file that cannot be opened is a
 * UserError naming the path as given and the directory it was resolved against, as for a CSV file.
 */
export async function readParquetDataset(path: string, options: ReadDatasetOptions = {}): Promise<Dataset> {
  const { cwd = process.cwd(), source = path, ...parseOptions } = options
  const fullPath = resolve(cwd, path)
  const outside = (from: string, to: string) => {
    const r = relative(from, to)
    return r === '..' || r.startsWith(`..${'/'}`) || r.startsWith('..\\') || isAbsolute(r)
  }
  const refuseOutside = (): never => {
    throw new UserError(
      `The data file '${path}' is outside the repository (resolved against ${cwd}).`,
      'Name a file inside the repository, with a path relative to its root.',
    )
  }
  if (outside(cwd, fullPath)) refuseOutside()
  let bytes: Buffer
  try {
    const [realRoot, realFile] = await Promise.all([realpath(cwd), realpath(fullPath)])
    if (outside(realRoot, realFile)) refuseOutside()
    bytes = await readFile(realFile)
  } catch (error) {
    if (error instanceof UserError) throw error
    const code = (error as NodeJS.ErrnoException).code
    const problem = code === 'ENOENT' ? 'there is no such file' : code === 'EISDIR' ? 'it is a directory' : code === 'EACCES' ? 'permission denied' : undefined
    if (problem === undefined) throw error
    throw new UserError(
      `Cannot read the data file '${path}' (resolved against ${cwd}): ${problem}.`,
      'Check the path: a relative path is read from that directory.',
    )
  }
  const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer
  return parseParquet(buffer, { ...parseOptions, source })
}
