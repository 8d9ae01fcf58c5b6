/**
 * The action's inputs: the one module that knows their names. Each is parsed strictly; a bad value
 * is a UserError naming the input as the workflow author typed it. An empty value means the default
 * from action.yml (the runner always passes defaults; an empty expression such as
 * `${{ inputs.x }}` passes ''), and test/adapters/action/inputs.test.ts checks that the defaults
 * here are the ones action.yml declares.
 */
import { UserError } from '../../core/errors.ts'
import type { Verdict } from '../../core/report/report.ts'

/** Reads one input by its name in action.yml; '' when absent (as `core.getInput` does). */
export type GetInput = (name: string) => string

export type FailOn = 'block' | 'warn' | 'never'
export type ActionMode = 'check' | 'publish' | 'plan' | 'shard' | 'merge'

export interface ActionInputs {
  /** Policy path relative to the repository root. */
  readonly policyPath: string
  /** '' when the workflow passes no token. */
  readonly token: string
  readonly baseRef: string | null
  readonly headRef: string | null
  readonly isCommentWanted: boolean
  readonly failOn: FailOn
  readonly mode: ActionMode
  /** Relative to the workspace: the report to publish (publish mode) or a copy to write (check mode). */
  readonly reportPath: string | null
  readonly isForkCodeAllowed: boolean
  /** Relative to the workspace. */
  readonly workingDirectory: string
  /** Name of the artifact for the HTML report; null: no upload. */
  readonly htmlArtifact: string | null
  /** Keep measured work units in the Actions cache (check and shard modes). */
  readonly isCacheWanted: boolean
  /** Plan and shard modes: how many shards; shard mode: which one (1 to shards). Null in the other modes. */
  readonly shards: number | null
  readonly shard: number | null
  /** Shard mode, relative to the workspace: where the partial result file goes. */
  readonly partialDirectory: string
  /** Shard mode, relative to the workspace: the refits stage's folders (the drop-columns stage); empty: the refits stage. */
  readonly after: readonly string[]
  /** Merge mode, relative to the workspace: every shard's folder. */
  readonly partials: readonly string[]
}

/** The defaults action.yml declares, used when an input arrives empty. */
export const inputDefaults = {
  policy: 'plumbline.yml',
  comment: 'true',
  'fail-on': 'block',
  mode: 'check',
  'allow-fork-code': 'false',
  'working-directory': '.',
  cache: 'false',
  'partial-dir': 'plumbline-partial',
} as const

const fixLine = (name: string) => `Fix '${name}:' in the workflow step, or delete the line to use the default from action.yml.`

/** The token alone, so that it can be masked before anything else is read or logged. */
export function readToken(getInput: GetInput): string {
  return getInput('token').trim()
}

export const actionModes = ['check', 'publish', 'plan', 'shard', 'merge'] as const

export function readInputs(getInput: GetInput): ActionInputs {
  const mode = readChoice(getInput, 'mode', actionModes)
  const reportPath = readOptional(getInput, 'report')
  if (mode === 'publish' && reportPath === null) {
    throw new UserError(
      "Input 'report' is required when 'mode' is publish: it is the path of the JSON report to post.",
      "Set 'report:' to where the download step put the report the pull_request job uploaded (see docs/action.md).",
    )
  }
  return {
    policyPath: readPath(getInput, 'policy'),
    token: readToken(getInput),
    baseRef: readRef(getInput, 'base'),
    headRef: readRef(getInput, 'head'),
    isCommentWanted: readBoolean(getInput, 'comment'),
    failOn: readChoice(getInput, 'fail-on', ['block', 'warn', 'never'] as const),
    mode,
    reportPath,
    isForkCodeAllowed: readBoolean(getInput, 'allow-fork-code'),
    workingDirectory: readPath(getInput, 'working-directory'),
    htmlArtifact: readArtifactName(getInput, 'html-report'),
    ...readShardInputs(getInput, mode),
  }
}

/** The inputs of plan, shard and merge; each is refused in a mode that does not read it, so a typo in 'mode' is not silent. */
function readShardInputs(getInput: GetInput, mode: ActionMode) {
  const shards = mode === 'plan' || mode === 'shard' ? readWholeNumber(getInput, 'shards', mode, 1, maxShards) : null
  const shard = mode === 'shard' ? readWholeNumber(getInput, 'shard', mode, 1, shards as number) : null
  const after = readPathList(getInput, 'after')
  const partials = readPathList(getInput, 'partials')
  const isCacheWanted = readBoolean(getInput, 'cache')
  const unused = (name: string, modes: string) => {
    throw new UserError(`Input '${name}' is read only when 'mode' is ${modes}; this step's mode is ${mode}.`, `Delete '${name}:' from the step, or set 'mode:' to ${modes}.`)
  }
  if (mode !== 'plan' && mode !== 'shard' && getInput('shards').trim() !== '') unused('shards', 'plan or shard')
  if (mode !== 'shard' && getInput('shard').trim() !== '') unused('shard', 'shard')
  if (mode !== 'shard' && after.length > 0) unused('after', 'shard')
  if (mode !== 'merge' && partials.length > 0) unused('partials', 'merge')
  if (isCacheWanted && mode !== 'check' && mode !== 'shard') unused('cache', 'check or shard')
  if (mode === 'merge' && partials.length === 0) {
    throw new UserError(
      "Input 'partials' is required when 'mode' is merge: the folders of every shard's partial results, one per line.",
      "Download every shard's artifact (actions/download-artifact) and set 'partials:' to the folder or folders it wrote (see docs/action.md).",
    )
  }
  return { isCacheWanted, shards, shard, partialDirectory: readPath(getInput, 'partial-dir'), after, partials }
}

/** As many shards as `plumbline plan --shards` accepts. */
const maxShards = 1000

function readWholeNumber(getInput: GetInput, name: string, mode: ActionMode, min: number, max: number): number {
  const raw = getInput(name).trim()
  if (raw === '') {
    throw new UserError(
      `Input '${name}' is required when 'mode' is ${mode}: ${name === 'shards' ? 'how many shards the work is split into' : `which shard this job runs, 1 to ${max}`}.`,
      name === 'shards' ? "Set 'shards:' to the same number on the plan step and on every shard step." : "Set 'shard: ${{ matrix.shard }}' on the step of the job matrix the plan step's 'matrix' output makes.",
    )
  }
  if (!/^\d+$/.test(raw) || Number(raw) < min || Number(raw) > max) {
    throw new UserError(
      `Input '${name}' must be a whole number from ${min} to ${max}; got '${raw.slice(0, 40)}'.`,
      name === 'shard' ? `Set 'shard:' to a value of the plan's matrix (1 to ${max}, the 'shards' input), normally '\${{ matrix.shard }}'.` : fixLine(name),
    )
  }
  return Number(raw)
}

/** Paths one per line (blank lines skipped), each checked as a single path. */
function readPathList(getInput: GetInput, name: string): string[] {
  const lines = getInput(name)
    .split('\n')
    .map((line) => line.trim())
    .filter((line) => line !== '')
  for (const line of lines) checkPathText(name, line)
  return lines
}

/** An artifact name as GitHub accepts it: no `" : < > | * ? \\ /`, control characters or line breaks. */
function readArtifactName(getInput: GetInput, name: string): string | null {
  const raw = getInput(name).trim()
  if (raw === '') return null
  // eslint-disable-next-line no-control-regex
  if (/[":<>|*?\\/\u0000-\u001f]/.test(raw) || raw.length > 200) {
    throw new UserError(
      `Input '${name}' must be an artifact name without " : < > | * ? \\ / or line breaks, at most 200 characters; got ${JSON.stringify(raw.slice(0, 220))}.`,
      `${fixLine(name)} Set it empty to upload no HTML report.`,
    )
  }
  return raw
}

/** Whether a verdict fails the step under `failOn`. 'error' always does. */
export function isFailingVerdict(verdict: Verdict, failOn: FailOn): boolean {
  if (verdict === 'error') return true
  if (failOn === 'never') return false
  if (failOn === 'warn') return verdict === 'warn' || verdict === 'block'
  return verdict === 'block'
}

function valueOrDefault(getInput: GetInput, name: keyof typeof inputDefaults): string {
  const raw = getInput(name).trim()
  return raw === '' ? inputDefaults[name] : raw
}

function readChoice<T extends string>(getInput: GetInput, name: keyof typeof inputDefaults, choices: readonly T[]): T {
  const raw = valueOrDefault(getInput, name)
  if (!(choices as readonly string[]).includes(raw)) {
    throw new UserError(`Input '${name}' must be one of ${choices.join(', ')}; got '${raw}'.`, fixLine(name))
  }
  return raw as T
}

/** The YAML 1.2 core-schema spellings, as `core.getBooleanInput` accepts them; nothing else. */
function readBoolean(getInput: GetInput, name: keyof typeof inputDefaults): boolean {
  const raw = valueOrDefault(getInput, name)
  if (['true', 'True', 'TRUE'].includes(raw)) return true
  if (['false', 'False', 'FALSE'].includes(raw)) return false
  throw new UserError(`Input '${name}' must be true or false; got '${raw}'.`, fixLine(name))
}

function readPath(getInput: GetInput, name: keyof typeof inputDefaults): string {
  const raw = valueOrDefault(getInput, name)
  checkPathText(name, raw)
  return raw
}

function readOptional(getInput: GetInput, name: string): string | null {
  const raw = getInput(name).trim()
  if (raw === '') return null
  checkPathText(name, raw)
  return raw
}

function checkPathText(name: string, raw: string) {
  if (raw.includes('\n') || raw.includes('\0')) {
    throw new UserError(`Input '${name}' must be a single path; got ${JSON.stringify(raw)}.`, fixLine(name))
  }
}

/**
 * A git ref or commit: no whitespace and no leading '-' (git would read it as an option). Anything
 * else goes to git, whose refusal names the input (resolveCommit's message).
 */
function readRef(getInput: GetInput, name: 'base' | 'head'): string | null {
  const raw = getInput(name).trim()
  if (raw === '') return null
  if (/[\s\0]/.test(raw) || raw.startsWith('-')) {
    throw new UserError(
      `Input '${name}' must be a commit SHA or a git ref such as main or origin/main; got '${raw}'.`,
      `Fix '${name}:' in the workflow step, or delete the line to take it from the event.`,
    )
  }
  return raw
}
