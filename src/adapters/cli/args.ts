import { parseArgs } from 'node:util'
import { UserError } from '../../core/errors.ts'
import { levenshteinDistance } from '../../core/policy/levenshtein-distance.ts'

export const usage = {
  top: `plumbline: a pull-request gate for model features.

Usage:
  plumbline check [--policy FILE] [--base REF] [--head REF] [--cache DIR] [--json FILE] [--markdown FILE] [--html FILE] [--quiet]
  plumbline plan --shards N [--policy FILE] [--base REF] [--head REF] [--out FILE]
  plumbline shard --index I --of N --out DIR [--after DIR...] [--cache DIR] [--policy FILE] [--base REF] [--head REF]
  plumbline merge DIR... [--policy FILE] [--base REF] [--head REF] [--json FILE] [--markdown FILE] [--html FILE] [--quiet]
  plumbline init [--train FILE] [--target COLUMN] [--task binary|regression] [--output FILE] [--force]
  plumbline --version

Run 'plumbline <command> --help' for a command's options.
Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix (policy, data, refs), 3 an internal error.`,
  check: `plumbline check: compare the baseline and the candidate model and decide pass, warn or block.

Options:
  --policy FILE     policy file, relative to the repository root (default plumbline.yml)
  --base REF        baseline commit (default: merge base of HEAD with the default branch)
  --head REF        candidate commit (default: the working tree, uncommitted changes included)
  --cache DIR       reuse measured work units from DIR when their digest matches, and store new ones there
  --json FILE       also write the report as JSON (the documented contract, docs/report-json.md)
  --markdown FILE   also write the report as markdown (what the pull-request comment shows)
  --html FILE       also write the report as one self-contained HTML file with charts
  --quiet           print only the verdict line (errors still go to stderr)
  -h, --help        this text

Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix, 3 an internal error.`,
  plan: `plumbline plan: split the check's work units into N shards for a CI job matrix.

Prints the matrix for strategy.matrix ({"shard":[1,...,N]}) on stdout and each shard's units on stderr.

Options:
  --shards N        how many shards (jobs) to split the work into
  --out FILE        also write the plan (every unit, its shard and estimated cost) as JSON
  --policy FILE, --base REF, --head REF   as for check
  -h, --help        this text`,
  shard: `plumbline shard: run one shard's work units and write a partial result file.

Run it twice per shard: first for the refits, then with --after for the drop-column refits
(their features are ranked by the refits' importances, so that stage needs every refits result).

Options:
  --index I         which shard, 1 to N
  --of N            how many shards
  --out DIR         folder for the partial result file (plumbline-partial-<stage>-<I>-of-<N>.json)
  --after DIR...    the refits stage's folders (all shards); runs the drop-columns stage
  --cache DIR       reuse measured work units from DIR when their digest matches, and store new ones there
  --policy FILE, --base REF, --head REF   as for check (the same for every shard and the merge)
  -h, --help        this text`,
  merge: `plumbline merge: check that every work unit is present once and from this run, then decide.

Takes the folders (or files) plumbline shard wrote, for both stages; writes the same reports as check.

Options:
  --policy FILE, --base REF, --head REF   as for check (the same as for the shards)
  --json FILE, --markdown FILE, --html FILE, --quiet   as for check
  -h, --help        this text

Exit codes: 0 pass or warn, 1 block, 2 a problem you can fix (a missing, duplicated or foreign unit), 3 an internal error.`,
  init: `plumbline init: write a commented starter policy for this repository.

Options:
  --train FILE      the training table to read (default: the only .csv under data/, if there is one)
  --target COLUMN   the column to predict (default: guessed from the names and values, and said so)
  --task TASK       binary or regression (default: binary when the target has two values)
  --output FILE     where to write (default plumbline.yml)
  --force           overwrite an existing file
  -h, --help        this text`,
}

/** What check and merge share: the sides and the report outputs. */
interface ReportCommand {
  policy?: string
  base?: string
  head?: string
  json?: string
  markdown?: string
  html?: string
  quiet: boolean
}

export type Command =
  | { name: 'help'; text: string }
  | { name: 'version' }
  | ({ name: 'check'; cache?: string } & ReportCommand)
  | ({ name: 'merge'; dirs: string[] } & ReportCommand)
  | { name: 'plan'; shards: number; policy?: string; base?: string; head?: string; out?: string }
  | { name: 'shard'; index: number; of: number; out: string; after?: string[]; cache?: string; policy?: string; base?: string; head?: string }
  | { name: 'init'; train?: string; target?: string; task?: 'binary' | 'regression'; output: string; force: boolean }

/** Strict parsing: an unknown option or a missing value is a UserError naming it. */
export function parseCommand(argv: readonly string[]): Command {
  const [first, ...rest] = argv
  if (first === undefined || first === '-h' || first === '--help' || first === 'help') return { name: 'help', text: usage.top }
  if (first === '--version' || first === '-v') return { name: 'version' }
  if (first === 'check' || first === 'merge') {
    const { values, positionals } = parseWith(rest, first, {
      policy: { type: 'string' },
      base: { type: 'string' },
      head: { type: 'string' },
      ...(first === 'check' ? { cache: { type: 'string' } } : {}),
      json: { type: 'string' },
      markdown: { type: 'string' },
      html: { type: 'string' },
      quiet: { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    })
    if (values.help) return { name: 'help', text: usage[first] }
    refuseEmpty(values, ['policy', 'base', 'head', 'cache', 'json', 'markdown', 'html'])
    const common = {
      policy: values.policy as string | undefined,
      base: values.base as string | undefined,
      head: values.head as string | undefined,
      json: values.json as string | undefined,
      markdown: values.markdown as string | undefined,
      html: values.html as string | undefined,
      quiet: Boolean(values.quiet),
    }
    if (first === 'check') {
      if (positionals.length) throw noPositionals('check', positionals[0])
      return { name: 'check', ...common, ...(values.cache !== undefined ? { cache: values.cache as string } : {}) }
    }
    if (positionals.length === 0) {
      throw new UserError('plumbline merge needs the folders plumbline shard wrote, got none.', 'Run plumbline merge DIR... with every shard’s --out folder (both stages).')
    }
    return { name: 'merge', dirs: positionals, ...common }
  }
  if (first === 'plan') {
    const values = parse(rest, 'plan', {
      shards: { type: 'string' },
      ...sideOptions,
      out: { type: 'string' },
    })
    if (values.help) return { name: 'help', text: usage.plan }
    refuseEmpty(values, ['policy', 'base', 'head', 'out'])
    const shards = wholeNumber(values.shards, '--shards', 'plan', 1, 1000)
    return { name: 'plan', shards, ...sideRefs(values), ...(values.out !== undefined ? { out: values.out as string } : {}) }
  }
  if (first === 'shard') {
    const values = parse(rest, 'shard', {
      index: { type: 'string' },
      of: { type: 'string' },
      out: { type: 'string' },
      after: { type: 'string', multiple: true },
      cache: { type: 'string' },
      ...sideOptions,
    })
    if (values.help) return { name: 'help', text: usage.shard }
    refuseEmpty(values, ['policy', 'base', 'head', 'out', 'cache'])
    const of = wholeNumber(values.of, '--of', 'shard', 1, 1000)
    const index = wholeNumber(values.index, '--index', 'shard', 1, of)
    if (values.out === undefined) throw new UserError('plumbline shard needs --out DIR, the folder for its partial result file.', "Run 'plumbline shard --help' for the options.")
    const after = values.after as unknown as string[] | undefined
    return {
      name: 'shard',
      index,
      of,
      out: values.out as string,
      ...sideRefs(values),
      ...(after ? { after } : {}),
      ...(values.cache !== undefined ? { cache: values.cache as string } : {}),
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
  throw new UserError(`Unknown command '${first}'.`, "Run 'plumbline --help' for the commands (check, plan, shard, merge, init).")
}

/** The options every command that opens both sides takes, and -h. */
const sideOptions = {
  policy: { type: 'string' },
  base: { type: 'string' },
  head: { type: 'string' },
  help: { type: 'boolean', short: 'h' },
} as const

function sideRefs(values: Record<string, unknown>): { policy?: string; base?: string; head?: string } {
  return {
    ...(values.policy !== undefined ? { policy: values.policy as string } : {}),
    ...(values.base !== undefined ? { base: values.base as string } : {}),
    ...(values.head !== undefined ? { head: values.head as string } : {}),
  }
}

function refuseEmpty(values: Record<string, unknown>, flags: readonly string[]) {
  for (const flag of flags) {
    if (values[flag] === '') {
      throw new UserError(`--${flag} needs a value, got an empty string.`, `Leave --${flag} out to use its default, or give it a value.`)
    }
  }
}

/** A whole number option from `min` to `max`, required. */
function wholeNumber(value: unknown, flag: string, command: string, min: number, max: number): number {
  if (value === undefined) throw new UserError(`plumbline ${command} needs ${flag} N.`, `Run 'plumbline ${command} --help' for the options.`)
  const text = String(value)
  const n = Number(text)
  if (!/^[0-9]+$/.test(text) || n < min || n > max) {
    throw new UserError(`${flag} must be a whole number from ${min} to ${max}, got '${text}'.`, `Run 'plumbline ${command} --help' for the options.`)
  }
  return n
}

function noPositionals(command: string, first: string): UserError {
  return new UserError(`plumbline ${command} takes no positional arguments, got '${first}'.`, `Run 'plumbline ${command} --help' for the options.`)
}

type Options = NonNullable<Parameters<typeof parseArgs>[0]>['options']

function parse(args: string[], command: string, options: Options): Record<string, string | boolean | undefined> {
  const { values, positionals } = parseWith(args, command, options)
  if (positionals.length) throw noPositionals(command, positionals[0])
  return values
}

function parseWith(args: string[], command: string, options: Options): { values: Record<string, string | boolean | undefined>; positionals: string[] } {
  try {
    const { values, positionals } = parseArgs({ args, options, strict: true, allowPositionals: true })
    return { values: values as Record<string, string | boolean | undefined>, positionals }
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
