import { access, readFile, readdir, writeFile } from 'node:fs/promises'
import { dirname, join, resolve } from 'node:path'
import { parseCsv } from '../../core/data/parse-csv.ts'
import { UserError } from '../../core/errors.ts'
import { holdoutPathFor, proposeTarget, renderStarterPolicy } from '../../core/policy/render-starter-policy.ts'
import { repositoryRoot } from '../git/git.ts'
import type { CliIo } from './cli-io.ts'
import { summarizeColumns } from './summarize-columns.ts'
import { makeFolder } from '../files/make-folder.ts'

/** plumbline init: read the training table and write a commented starter policy. */
export async function init(command: { train?: string; target?: string; task?: 'binary' | 'regression'; output: string; force: boolean }, io: CliIo) {
  const root = await repositoryRoot(io.cwd).catch(() => io.cwd)
  const output = resolve(io.cwd, command.output)
  if (!command.force && (await exists(output))) {
    throw new UserError(`${command.output} already exists.`, 'Pass --force to overwrite it, or --output FILE to write elsewhere.')
  }
  const trainPath = command.train ?? (await findTrainingTable(root))
  const text = await readFile(resolve(root, trainPath), 'utf8').catch(() => {
    throw new UserError(`Cannot read the training table ${trainPath} (looked in ${root}).`, 'Pass --train FILE with a CSV path relative to the repository root.')
  })
  const data = parseCsv(text, { source: trainPath, requireTarget: false })
  const columns = summarizeColumns(data)
  const target = command.target ?? proposeTarget(columns)
  if (command.target && !columns.some((c) => c.name === command.target)) {
    throw new UserError(`--target '${command.target}' is not a column of ${trainPath}.`, `Columns: ${columns.map((c) => c.name).join(', ')}.`)
  }
  // An existing holdout file beside the training table is used instead of a split.
  const holdout = holdoutPathFor(trainPath)
  const holdoutPath = holdout !== trainPath && (await exists(resolve(root, holdout))) ? holdout : undefined
  const policy = renderStarterPolicy({ trainPath, columns, rows: data.rows, suggestedTarget: target, task: command.task, ...(holdoutPath ? { holdoutPath } : {}) })
  await makeFolder(dirname(output))
  await writeFile(output, policy)
  io.stdout(`Wrote ${command.output}${target ? ` (target: ${target})` : ' (no target guessed: set one)'}. Review it, then run 'plumbline check'.\n`)
  return 0
}

async function findTrainingTable(root: string): Promise<string> {
  const dir = join(root, 'data')
  const files = await readdir(dir).catch(() => [] as string[])
  const csvs = files.filter((f) => f.endsWith('.csv'))
  const train = csvs.filter((f) => /train/i.test(f))
  if (train.length === 1) return `data/${train[0]}`
  if (csvs.length === 1) return `data/${csvs[0]}`
  throw new UserError(
    csvs.length ? `Several CSV files under data/ (${csvs.join(', ')}); cannot tell which is the training table.` : 'No CSV file found under data/.',
    'Pass --train FILE with the training table, relative to the repository root.',
  )
}

async function exists(path: string) {
  return access(path).then(
    () => true,
    () => false,
  )
}
