import { resolve } from 'node:path'
import { parseCsv, type ParseCsvOptions } from '../../core/data/parse-csv.ts'
import type { Dataset } from '../../core/data/dataset.ts'
import { UserError } from '../../core/errors.ts'
import { closestFiles } from './closest-file.ts'
import { readConfinedFile, readLimits, readRegularFile } from './confined-file.ts'

export type ReadDatasetOptions = Omit<ParseCsvOptions, 'source'> & {
  /** Name for messages; defaults to `path` as given. */
  readonly source?: string
  /** Directory a relative `path` is resolved against; defaults to process.cwd(). */
  readonly cwd?: string
  /**
   * The policy key the path came from (data.train, ...): the file must then lie inside `cwd` after
   * following symlinks, and a refusal names the key. Without it any path is read (tests, scripts).
   */
  readonly key?: string
  /** How `cwd` is called in messages when `key` is given, e.g. "the head checkout". */
  readonly rootName?: string
}

/**
 * Reads a UTF-8 CSV file and parses it with `parseCsv`. Only a regular file of at most
 * readLimits.data bytes is read (a FIFO, device or directory is refused without blocking). A file that
 * cannot be opened (missing, a directory, no permission) is a UserError naming the path as given and
 * the directory it was resolved against; with `key`, a path outside `cwd` is refused naming the key.
 */
export async function readDataset(path: string, options: ReadDatasetOptions = {}): Promise<Dataset> {
  const { cwd = process.cwd(), source = path, key, rootName, ...parseOptions } = options
  // With a source ("head: data/train.csv") the side and the path in the repository say where; the
  // folder it was resolved against may be a temporary checkout that is gone by the time one reads this.
  const problem = (what: string) =>
    options.source === undefined
      ? new UserError(`Cannot read the data file '${path}' (resolved against ${cwd}): ${what}.`, 'Check the path: a relative path is read from that directory.')
      : new UserError(
          `Cannot read the data file ${source}${key ? ` (${key} in the policy)` : ''}: ${what} in that side's commit.`,
          suggestion(what) ??
            "Check the path in the policy (relative to the repository root), and that the file is committed on that side, or made by 'prepare'.",
        )
  const suggestion = (what: string): string | undefined => {
    if (what !== 'there is no such file' || key === undefined) return undefined
    const near = closestFiles(cwd, path)
    return near.length > 0 ? `Did you mean ${near.map((n) => `'${n}'`).join(' or ')}? Set ${key} to the file's path relative to the repository root.` : undefined
  }
  const limits = {
    maxBytes: readLimits.data,
    what: 'data file',
    missing: () => problem('there is no such file'),
    limitFix: 'Sample the rows into a smaller file in prepare (a gate needs thousands of rows, not millions), or check that the path names the right file.',
  }
  let bytes: Buffer
  try {
    bytes =
      key === undefined
        ? await readRegularFile(resolve(cwd, path), { ...limits, name: `The data file '${path}'` })
        : await readConfinedFile({ key, path, root: cwd, rootName: rootName ?? cwd }, limits)
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'EACCES') throw problem('permission denied')
    if (error instanceof UserError && / is a directory, not a regular file/.test(error.message)) throw problem('it is a directory')
    throw error
  }
  return parseCsv(bytes.toString('utf8'), { ...parseOptions, source })
}
