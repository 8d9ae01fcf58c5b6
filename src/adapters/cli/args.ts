import { parseArgs } from 'node:util'
import { UserError } from '../../core/errors.ts'
import { levenshteinDistance } from '../../core/policy/levenshtein-distance.ts'

export const usage = {
  top: `plumbline: a pull-request gate for model features.

Usage:
  plumbline check [--policy FILE] [--base REF] [--head REF] [--json FILE] [--markdown FILE] [--html FILE] [--quiet]
  plumbline init [--train FILE] [--target COLUMN] [--task binary|regression] [--output FILE] [--force]
  plumbline --version

Run 'plumbline <command> --help' for a command's options.
Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix (policy, data, refs), 3 an internal error.`,
  check: `plumbline check: compare the baseline and the candidate model and decide pass, warn or block.

Options:
  --policy FILE     policy file, relative to the repository root (default plumbline.yml)
  --base REF        baseline commit (default: merge base of HEAD with the default branch)
  --head REF        candidate commit (default: the working tree, uncommitted changes included)
  --json FILE       also write the report as JSON (the documented contract, docs/report-json.md)
  --markdown FILE   also write the report as markdown (what the pull-request comment shows)
  --html FILE       also write the report as one self-contained HTML file with charts
  --quiet           print only the verdict line (errors still go to stderr)
  -h, --help        this text

Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix, 3 an internal error.`,
  init: `plumbline init: write a commented starter policy for this repository.

Options:
  --train FILE      the training table to read (default: the only .csv under data/, if there is one)
  --target COLUMN   the column to predict (default: guessed from the names and values, and said so)
  --task TASK       binary or regression (default: binary when the target has two values)
  --output FILE     where to write (default plumbline.yml)
  --force           overwrite an existing file
  -h, --help        this text`,
}

export type Command =
  | { name: 'help'; text: string }
  | { name: 'version' }
  | {
      name: 'check'
      policy?: string
      base?: string
      head?: string
      json?: string
      markdown?: string
      html?: string
      quiet: boolean
    }
  | { name: 'init'; train?: string; target?: string; task?: 'binary' | 'regression'; output: string; force: boolean }

/** Strict parsing: an unknown option or a missing value is a UserError naming it. */
export function parseCommand(argv: readonly string[]): Command {
  const [first, ...rest] = argv
  if (first === undefined || first === '-h' || first === '--help' || first === 'help') return { name: 'help', text: usage.top }
  if (first === '--version' || first === '-v') return { name: 'version' }
  if (first === 'check') {
    const values = parse(rest, 'check', {
      policy: { type: 'string' },
      base: { type: 'string' },
      head: { type: 'string' },
      json: { type: 'string' },
      markdown: { type: 'string' },
      html: { type: 'string' },
      quiet: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    })
    if (values.help) return { name: 'help', text: usage.check }
    for (const flag of ['policy', 'base', 'head', 'json', 'markdown', 'html'] as const) {
      if (values[flag] === '') {
        throw new UserError(`--${flag} needs a value, got an empty string.`, `Leave --${flag} out to use its default, or give it a value.`)
      }
    }
    return {
      name: 'check',
      policy: values.policy as string | undefined,
      base: values.base as string | undefined,
      head: values.head as string | undefined,
      json: values.json as string | undefined,
      markdown: values.markdown as string | undefined,
      html: values.html as string | undefined,
      quiet: Boolean(values.quiet),
    }
  }
  if (first === 'init') {
    const values = parse(rest, 'init', {
      train: { type: 'string' },
      target: { type: 'string' },
      task: { type: 'string' },
      output: { type: 'string' },
      force: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    })
    if (values.help) return { name: 'help', text: usage.init }
    const task = values.task as string | undefined
    if (task !== undefined && task !== 'binary' && task !== 'regression') {
      throw new UserError(`--task must be binary or regression, got '${task}'.`, "Run 'plumbline init --help' for the options.")
    }
    return {
      name: 'init',
      train: values.train as string | undefined,
      target: values.target as string | undefined,
      task,
      output: (values.output as string | undefined) ?? 'plumbline.yml',
      force: Boolean(values.force),
    }
  }
  throw new UserError(`Unknown command '${first}'.`, "Run 'plumbline --help' for the commands (check, init).")
}

type Options = NonNullable<Parameters<typeof parseArgs>[0]>['options']

function parse(args: string[], command: string, options: Options): Record<string, string | boolean | undefined> {
  try {
    const { values, positionals } = parseArgs({ args, options, strict: true, allowPositionals: true })
    if (positionals.length) {
      throw new UserError(`plumbline ${command} takes no positional arguments, got '${positionals[0]}'.`, `Run 'plumbline ${command} --help' for the options.`)
    }
    return values as Record<string, string | boolean | undefined>
  } catch (error) {
    if (error instanceof UserError) throw error
    const code = (error as { code?: string }).code
    const fix = `Run 'plumbline ${command} --help' for the options.`
    const unknown = (error as Error).message.match(/^Unknown option '([^']+)'/)
    if (code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION' && unknown) {
      const suggestion = closestOption(unknown[1], options)
      throw new UserError(
        `plumbline ${command}: unknown option '${unknown[1]}'.${suggestion ? ` Did you mean '${suggestion}'?` : ''}`,
        fix,
      )
    }
    const missing = (error as Error).message.match(/^Option '(?:-\w, )?(--[\w-]+) <value>' argument missing/)
    if (code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE' && missing) {
      throw new UserError(`plumbline ${command}: ${missing[1]} needs a value.`, fix)
    }
    const message = (error as Error).message.replace(/\.?$/, '.')
    throw new UserError(`plumbline ${command}: ${message}`, fix)
  }
}

/** The option nearest to what was typed (Levenshtein distance at most 3, and less than its length). */
function closestOption(typed: string, options: Options): string | undefined {
  const bare = typed.replace(/^-+/, '').split('=')[0].toLowerCase()
  let best: { name: string; distance: number } | undefined
  for (const name of Object.keys(options ?? {})) {
    const distance = levenshteinDistance(bare, name)
    if (distance <= 3 && distance < Math.max(bare.length, 2) && (!best || distance < best.distance)) best = { name, distance }
  }
  return best && `--${best.name}`
}
