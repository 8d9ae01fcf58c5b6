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
export type ActionMode = 'check' | 'publish'

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
}

/** The defaults action.yml declares, used when an input arrives empty. */
export const inputDefaults = {
  policy: 'plumbline.yml',
  comment: 'true',
  'fail-on': 'block',
  mode: 'check',
  'allow-fork-code': 'false',
  'working-directory': '.',
} as const

const fixLine = (name: string) => `Fix '${name}:' in the workflow step, or delete the line to use the default from action.yml.`

/** The token alone, so that it can be masked before anything else is read or logged. */
export function readToken(getInput: GetInput): string {
  return getInput('token').trim()
}

export function readInputs(getInput: GetInput): ActionInputs {
  const mode = readChoice(getInput, 'mode', ['check', 'publish'] as const)
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
  }
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
