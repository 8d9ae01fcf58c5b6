import { execFile } from 'node:child_process'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import { UserError } from '../../core/errors.ts'
import { childEnvironment } from '../security/child-environment.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'

const execFileAsync = promisify(execFile)

/** git with the allowlisted environment (no token variables; credentials stay in git's own config). */
const exec = (file: string, args: readonly string[], options: { cwd: string; maxBuffer?: number }) =>
  execFileAsync(file, args, { ...options, env: childEnvironment({ GIT_TERMINAL_PROMPT: '0' }, { purpose: 'git' }) })

/** Runs git in `cwd`; a failure becomes a UserError quoting git's own message. */
export async function git(cwd: string, args: readonly string[], what: string): Promise<string> {
  try {
    const { stdout } = await exec('git', args, { cwd, maxBuffer: 64 * 1024 * 1024 })
    return stdout.trim()
  } catch (error) {
    const detail = cleanOutsideText((error as { stderr?: string }).stderr?.trim() || (error as Error).message)
    throw new UserError(`git could not ${what}: ${detail}`, `Run plumbline inside a git repository with the refs you name (git ${args.join(' ')}).`)
  }
}

export async function repositoryRoot(cwd: string): Promise<string> {
  try {
    const { stdout } = await exec('git', ['rev-parse', '--show-toplevel'], { cwd })
    return stdout.trim()
  } catch {
    throw new UserError(
      `${cwd} is not inside a git repository.`,
      'plumbline compares a base and a head commit: run it from a clone of your repository.',
    )
  }
}

/** The commit a ref names, or a UserError naming the ref as the user typed it. */
export async function resolveCommit(root: string, ref: string, flag: string): Promise<string> {
  try {
    const { stdout } = await exec('git', ['rev-parse', '--verify', '--quiet', `${ref}^{commit}`], { cwd: root })
    return stdout.trim()
  } catch {
    // A fetch command is suggested only for a plain branch, tag or commit name: the ref is echoed into
    // a line a user may paste into a shell, so 'main;rm -rf /' must not come back as a command.
    const plainName = /^[A-Za-z0-9][A-Za-z0-9._/-]*$/.test(ref) && !ref.includes('..')
    throw new UserError(
      `${flag} '${ref}' does not name a commit in ${root}.`,
      plainName
        ? `Check the spelling, or fetch it first (git fetch origin ${ref}); a shallow clone may lack it.`
        : 'It is not a plain branch, tag or commit name: check the spelling (a branch name has no spaces, semicolons or quotes).',
    )
  }
}

/**
 * The default base: the merge base of HEAD with the default branch (origin's HEAD when known, else
 * a local or remote main or master).
 */
export async function defaultBase(root: string): Promise<{ ref: string; commit: string }> {
  const candidates: string[] = []
  try {
    const { stdout } = await exec('git', ['symbolic-ref', '--quiet', 'refs/remotes/origin/HEAD'], { cwd: root })
    candidates.push(stdout.trim().replace(/^refs\/remotes\//, ''))
  } catch {
    // no remote HEAD: fall back to the usual names
  }
  candidates.push('origin/main', 'origin/master', 'main', 'master')
  for (const name of candidates) {
    try {
      const { stdout } = await exec('git', ['merge-base', 'HEAD', name], { cwd: root })
      return { ref: `merge-base(HEAD, ${name})`, commit: stdout.trim() }
    } catch {
      // try the next name
    }
  }
  throw new UserError(
    'Could not find the default branch to compare against (tried origin/HEAD, origin/main, origin/master, main, master).',
    "Name the baseline explicitly with --base REF (for example --base main~1), or the action's 'base' input.",
  )
}

/** A detached worktree of `commit` in a new temporary folder; `remove` deletes it (call in finally). */
export async function addWorktree(root: string, commit: string): Promise<{ path: string; remove: () => Promise<void> }> {
  const parent = await mkdtemp(join(tmpdir(), 'plumbline-side-'))
  const path = join(parent, 'tree')
  await git(root, ['worktree', 'add', '--detach', '--quiet', path, commit], `check out ${commit.slice(0, 12)} into a worktree`).catch(
    async (error: unknown) => {
      await rm(parent, { recursive: true, force: true })
      throw error
    },
  )
  return {
    path,
    remove: async () => {
      try {
        await exec('git', ['worktree', 'remove', '--force', path], { cwd: root })
      } catch {
        // already gone: prune below
      }
      await rm(parent, { recursive: true, force: true })
      await exec('git', ['worktree', 'prune'], { cwd: root }).catch(() => undefined)
    },
  }
}

/** The file's text at a commit, or null when it does not exist there. */
export async function readFileAtCommit(root: string, commit: string, path: string): Promise<string | null> {
  try {
    const { stdout } = await exec('git', ['show', `${commit}:${path}`], { cwd: root, maxBuffer: 16 * 1024 * 1024 })
    return stdout
  } catch {
    return null
  }
}
