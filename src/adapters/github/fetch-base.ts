/**
 * Makes sure a commit the check compares is in the local clone. actions/checkout fetches one commit
 * by default, so a pull request's base (and its head, when the checkout is the merge commit) is
 * often missing; it is fetched alone with `git fetch --depth=1 origin <sha>`, which GitHub serves for
 * any commit of the repository and its pull requests. Uses the credentials actions/checkout left in
 * the clone's git config.
 */
import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { UserError } from '../../core/errors.ts'
import { childEnvironment } from '../security/child-environment.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'

const execFileAsync = promisify(execFile)

/** git with the allowlisted environment (the fetch authenticates with what actions/checkout put in the clone's config). */
const exec = (file: string, args: readonly string[], options: { cwd: string; maxBuffer?: number }) =>
  execFileAsync(file, args, { ...options, env: childEnvironment({ GIT_TERMINAL_PROMPT: '0' }, { purpose: 'git' }) })

export interface FetchCommitRequest {
  /** A folder inside the clone. */
  readonly cwd: string
  /** A commit SHA or a ref. */
  readonly ref: string
  /** What the ref is and where it came from, for the log and messages: "the base, from the pull_request event". */
  readonly label: string
  readonly log: (line: string) => void
  /** The remote to fetch from; default origin. */
  readonly remote?: string
}

/**
 * Returns what to hand to the check: the ref itself when the clone has it (or the fetched SHA), or,
 * for a branch or tag fetched by name (which lands in FETCH_HEAD only), the commit it named.
 */
export async function fetchBase(request: FetchCommitRequest): Promise<string> {
  if (await hasCommit(request.cwd, request.ref)) return request.ref
  const remote = request.remote ?? 'origin'
  const shortRef = /^[0-9a-f]{40}/i.test(request.ref) ? request.ref.slice(0, 12) : request.ref
  try {
    await exec('git', ['fetch', '--no-tags', '--no-recurse-submodules', '--depth=1', remote, request.ref], {
      cwd: request.cwd,
      maxBuffer: 16 * 1024 * 1024,
    })
  } catch (error) {
    const detail = cleanOutsideText((error as { stderr?: string }).stderr?.trim() || (error as Error).message)
    throw new UserError(
      `${shortRef} (${request.label}) is not in the checkout, and 'git fetch --depth=1 ${remote} ${shortRef}' failed: ${detail}`,
      "Check the ref's spelling; if it is right, check out with history instead: set 'fetch-depth: 0' on the actions/checkout step.",
    )
  }
  const isRef = !/^[0-9a-f]{40}([0-9a-f]{24})?$/i.test(request.ref)
  if (isRef) {
    // A fetched branch or tag lands in FETCH_HEAD only; name it by the commit from now on.
    const commit = (await exec('git', ['rev-parse', 'FETCH_HEAD^{commit}'], { cwd: request.cwd })).stdout.trim()
    request.log(`Fetched ${request.ref} (${request.label}) from ${remote} (depth 1), commit ${commit.slice(0, 12)}: the checkout did not have it.`)
    return commit
  }
  if (!(await hasCommit(request.cwd, request.ref))) {
    throw new UserError(
      `Fetched ${shortRef} (${request.label}) from ${remote}, but the commit is still not in the checkout.`,
      "Set 'fetch-depth: 0' on the actions/checkout step.",
    )
  }
  request.log(`Fetched ${shortRef} (${request.label}) from ${remote} (depth 1): the checkout did not have it.`)
  return request.ref
}

async function hasCommit(cwd: string, ref: string): Promise<boolean> {
  try {
    await exec('git', ['rev-parse', '--verify', '--quiet', '--end-of-options', `${ref}^{commit}`], { cwd })
    return true
  } catch {
    return false
  }
}
