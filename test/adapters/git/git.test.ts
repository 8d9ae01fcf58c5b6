import { execFileSync } from 'node:child_process'
import { existsSync, mkdtempSync, readdirSync, readFileSync, realpathSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { addWorktree, defaultBase, git, readFileAtCommit, repositoryRoot, resolveCommit } from '../../../src/adapters/git/git.ts'
import { UserError } from '../../../src/core/errors.ts'
import { makeRepository, type TestRepository } from '../../helpers/make-repository.ts'

const base = { 'plumbline.yml': 'version: 1\n', 'data/train.csv': 'a,late\n1,0\n' }
const repo: TestRepository = makeRepository({ base, head: { 'data/train.csv': 'a,late\n2,1\n' } })
const outside = realpathSync(mkdtempSync(join(tmpdir(), 'plumbline-not-a-repo-')))
afterAll(() => {
  repo.remove()
  rmSync(outside, { recursive: true, force: true })
})

describe('repositoryRoot(cwd)', () => {
  it('finds the top of the repository from a subfolder, and names a folder outside any repository', async () => {
    expect(await repositoryRoot(join(repo.root, 'data'))).toBe(repo.root)
    await expect(repositoryRoot(outside)).rejects.toThrow(
      new UserError(`${outside} is not inside a git repository.`, 'plumbline compares a base and a head commit: run it from a clone of your repository.'),
    )
  })
})

describe('resolveCommit(root, ref, flag)', () => {
  it('resolves a branch to its commit and refuses an unknown ref naming the flag as typed', async () => {
    expect(await resolveCommit(repo.root, 'main', '--base')).toBe(repo.baseCommit)
    expect(await resolveCommit(repo.root, 'pr~0', '--head')).toBe(repo.headCommit)
    const error = await resolveCommit(repo.root, 'mian', '--base').catch((e: unknown) => e)
    expect(error).toBeInstanceOf(UserError)
    expect((error as UserError).message).toBe(`--base 'mian' does not name a commit in ${repo.root}.`)
    expect((error as UserError).fix).toBe('Check the spelling, or fetch it first (git fetch origin mian); a shallow clone may lack it.')
  })

  it('never echoes a ref that is not a plain name into a suggested command', async () => {
    for (const ref of ['main;rm -rf /', 'main && curl x', '$(id)', "it's", 'a..b', '-x']) {
      const error = (await resolveCommit(repo.root, ref, '--base').catch((e: unknown) => e)) as UserError
      expect(error).toBeInstanceOf(UserError)
      expect(error.fix, ref).toBe('It is not a plain branch, tag or commit name: check the spelling (a branch name has no spaces, semicolons or quotes).')
    }
    const slashed = (await resolveCommit(repo.root, 'feature/late-scan_2.1', '--head').catch((e: unknown) => e)) as UserError
    expect(slashed.fix).toContain('(git fetch origin feature/late-scan_2.1)')
  })
})

describe('defaultBase(root)', () => {
  it('is the merge base of HEAD with main', async () => {
    expect(await defaultBase(repo.root)).toEqual({ ref: 'merge-base(HEAD, main)', commit: repo.baseCommit })
  })

  it('asks for --base when there is no default branch to compare against', async () => {
    const lonely = makeRepository({ base })
    try {
      lonely.git('branch', '-m', 'main', 'trunk')
      const error = await defaultBase(lonely.root).catch((e: unknown) => e)
      expect((error as UserError).message).toBe(
        'Could not find the default branch to compare against (tried origin/HEAD, origin/main, origin/master, main, master).',
      )
      expect((error as UserError).fix).toBe("Name the baseline explicitly with --base REF (for example --base main~1), or the action's 'base' input.")
    } finally {
      lonely.remove()
    }
  })
})

describe('addWorktree(root, commit)', () => {
  it('checks the commit out in a temporary folder, and remove() deletes it and its registration', async () => {
    const tree = await addWorktree(repo.root, repo.baseCommit)
    expect(readFileSync(join(tree.path, 'data/train.csv'), 'utf8')).toBe('a,late\n1,0\n')
    expect(execFileSync('git', ['rev-parse', 'HEAD'], { cwd: tree.path }).toString().trim()).toBe(repo.baseCommit)
    await tree.remove()
    expect(existsSync(dirname(tree.path))).toBe(false)
    expect(repo.git('worktree', 'list', '--porcelain').split('\n').filter((l) => l.startsWith('worktree '))).toEqual([`worktree ${repo.root}`])
    // A second remove (a cleanup that runs twice) is harmless.
    await expect(tree.remove()).resolves.toBeUndefined()
  })

  it('leaves no temporary folder behind when git cannot check the commit out', async () => {
    // Bug fixed with this test: the folder made for the worktree stayed when `git worktree add` failed.
    // A private TMPDIR (os.tmpdir() reads it on every call), since other test files make such folders too.
    const privateTmp = mkdtempSync(join(outside, 'tmp-'))
    const saved = process.env.TMPDIR
    process.env.TMPDIR = privateTmp
    try {
      const error = await addWorktree(repo.root, '0'.repeat(40)).catch((e: unknown) => e)
      expect(error).toBeInstanceOf(UserError)
      expect((error as UserError).message.startsWith('git could not check out 000000000000 into a worktree: ')).toBe(true)
      expect(readdirSync(privateTmp)).toEqual([])
    } finally {
      if (saved === undefined) delete process.env.TMPDIR
      else process.env.TMPDIR = saved
    }
  })
})

describe('readFileAtCommit(root, commit, path) and git(cwd, args, what)', () => {
  it('reads a file as committed, or null where it does not exist', async () => {
    expect(await readFileAtCommit(repo.root, repo.baseCommit, 'data/train.csv')).toBe('a,late\n1,0\n')
    expect(await readFileAtCommit(repo.root, repo.headCommit, 'data/train.csv')).toBe('a,late\n2,1\n')
    expect(await readFileAtCommit(repo.root, repo.baseCommit, 'no/such/file.yml')).toBeNull()
  })

  it('turns a git failure into a UserError quoting git', async () => {
    const error = await git(repo.root, ['rev-parse', '--verify', 'no-such-ref'], 'find no-such-ref').catch((e: unknown) => e)
    expect(error).toBeInstanceOf(UserError)
    expect((error as UserError).message).toBe('git could not find no-such-ref: fatal: Needed a single revision')
    expect((error as UserError).fix).toBe('Run plumbline inside a git repository with the refs you name (git rev-parse --verify no-such-ref).')
  })
})
