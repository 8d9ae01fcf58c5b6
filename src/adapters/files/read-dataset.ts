import { readFile } from 'node:fs/promises'
import { resolve } from 'node:path'
import { parseCsv, type ParseCsvOptions } from '../../core/data/parse-csv.ts'
import type { Dataset } from '../../core/data/dataset.ts'
import { UserError } from '../../core/errors.ts'

export type ReadDatasetOptions = Omit<ParseCsvOptions, 'source'> & {
  /** Name for messages; defaults to `path` as given. */
  readonly source?: string
  /** Directory a relative `path` is resolved against; defaults to process.cwd(). */
  readonly cwd?: string
}

/**
 * Reads a UTF-8 CSV file and parses it with `parseCsv`. A file that cannot be opened (missing, a
 * directory, no permission) is a UserError naming the path as given and the directory it was
 * resolved against; anything else reading throws is passed on unchanged.
 */
export async function readDataset(path: string, options: ReadDatasetOptions = {}): Promise<Dataset> {
  const { cwd = process.cwd(), source = path, ...parseOptions } = options
  const fullPath = resolve(cwd, path)
  let text: string
  try {
    text = await readFile(fullPath, 'utf8')
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code
    const problem = code === 'ENOENT' ? 'there is no such file' : code === 'EISDIR' ? 'it is a directory' : code === 'EACCES' ? 'permission denied' : undefined
    if (problem === undefined) throw error
    // With a source ("head: data/train.csv") the side and the path in the repository say where; the
    // folder it was resolved against may be a temporary checkout that is gone by the time one reads this.
    throw options.source === undefined
      ? new UserError(
          `Cannot read the data file '${path}' (resolved against ${cwd}): ${problem}.`,
          'Check the path: a relative path is read from that directory.',
        )
      : new UserError(
          `Cannot read the data file ${source}: ${problem} in that side's commit.`,
          "Check the path in the policy (relative to the repository root), and that the file is committed on that side, or made by 'prepare'.",
        )
  }
  return parseCsv(text, { ...parseOptions, source })
}
