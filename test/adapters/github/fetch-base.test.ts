import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fetchBase } from '../../../src/adapters/github/fetch-base.ts'
import { UserError } from '../../../src/core/errors.ts'

let folder: string
let clone: string
let first: string
let second: string
const git = (cwd: string, ...args: string[]) => execFileSync('git', args, { cwd, encoding: 'utf8' }).trim()

beforeAll(() => {
  folder = mkdtempSync(join(tmpdir(), 'plumbline-fetch-'))
  const origin = join(folder, 'origin')
  execFileSync('git', ['init', '--quiet', '--initial-branch=main', origin])
  git(origin, 'config', 'user.email', 'ci@northwind-parcel.example')
  git(origin, 'config', 'user.name', 'Northwind Parcel CI')
  // GitHub serves any commit by SHA; a local repository needs this to do the same.
  git(origin, 'config', 'uploadpack.allowAnySHA1InWant', 'true')
  writeFileSync(join(origin, 'plumbline.yml'), 'version: 1\n')
  git(origin, 'add', '-A')
  git(origin, 'commit', '--quiet', '-m', 'base')
  first = git(origin, 'rev-parse', 'HEAD')
  git(origin, 'branch', 'release')
  writeFileSync(join(origin, 'plumbline.yml'), 'version: 1\nseed: 3\n')
  git(origin, 'commit', '--quiet', '-am', 'head')
  second = git(origin, 'rev-parse', 'HEAD')
  clone = join(folder, 'clone')
  // What actions/checkout does by default: one commit, no history.
  execFileSync('git', ['clone', '--quiet', '--depth=1', '--single-branch', '--branch', 'main', `file://${origin}`, clone])
})
afterAll(() => rmSync(folder, { recursive: true, force: true }))

describe('fetchBase(request)', () => {
  it('leaves a commit the clone has alone', async () => {
    const lines: string[] = []
    expect(await fetchBase({ cwd: clone, ref: second, label: 'the head, from the pull_request event', log: (l) => lines.push(l) })).toBe(second)
    expect(lines).toEqual([])
  })

  it('fetches a missing commit of a shallow clone, and says so', async () => {
    const lines: string[] = []
    expect(() => git(clone, 'cat-file', '-e', `${first}^{commit}`)).toThrow()
    expect(await fetchBase({ cwd: clone, ref: first, label: 'the base, from the pull_request event', log: (l) => lines.push(l) })).toBe(first)
    expect(git(clone, 'cat-file', '-t', first)).toBe('commit')
    expect(lines).toEqual([`Fetched ${first.slice(0, 12)} (the base, from the pull_request event) from origin (depth 1): the checkout did not have it.`])
  })

  it('fetches a branch by name and hands back its commit', async () => {
    const lines: string[] = []
    expect(await fetchBase({ cwd: clone, ref: 'release', label: "the base, from input 'base'", log: (l) => lines.push(l) })).toBe(first)
    expect(lines).toEqual([`Fetched release (the base, from input 'base') from origin (depth 1), commit ${first.slice(0, 12)}: the checkout did not have it.`])
  })

  it('names the ref and what to change when the fetch fails', async () => {
    const error = await fetchBase({ cwd: clone, ref: 'no-such-branch', label: "the base, from input 'base'", log: () => undefined }).catch((e) => e)
    expect(error).toBeInstanceOf(UserError)
    expect(error.message).toMatch(/^no-such-branch \(the base, from input 'base'\) is not in the checkout, and 'git fetch --depth=1 origin no-such-branch' failed: /)
    expect(error.fix).toBe("Check the ref's spelling; if it is right, check out with history instead: set 'fetch-depth: 0' on the actions/checkout step.")
  })
})
