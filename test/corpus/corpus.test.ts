/**
 * Runs every case of the bad-input corpus (bad-inputs.ts) through its in-process entry point, with a
 * 20 s limit each (a hang fails the case), and checks its exact class of outcome: a UserError whose
 * message matches, or an accepted result that passes its check. For every case, the text the CLI
 * would print (describeFailure, then cleanOutsideText) must hold no secret, no text from outside the
 * checkout, no escape character and no stack trace. A sample of hostile repositories also goes
 * through the real CLI process. The counts are printed at the end (and stated in the README).
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, realpathSync, rmSync, symlinkSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearSecrets, registerEnvironmentSecrets } from '../../src/adapters/security/secrets.ts'
import { cleanOutsideText } from '../../src/adapters/security/terminal-text.ts'
import { describeFailure, UserError } from '../../src/core/errors.ts'
import { baseFiles, makeRepository, smallPolicy, type TestRepository } from '../helpers/make-repository.ts'
import { baseEnvironment, runSource } from '../helpers/run-process.ts'
import { buildCorpus, corpusToken, outsideSentinel, type CorpusCase, type Family } from './bad-inputs.ts'

const folder = realpathSync(mkdtempSync(join(tmpdir(), 'plumbline-corpus-')))
const marker = join(folder, 'ran-a-command')
const repositories: TestRepository[] = []
const savedEnv = { ...process.env }
let corpus: CorpusCase[] = []

const secretNames = ['GITHUB_TOKEN', 'INPUT_TOKEN', 'GH_TOKEN', 'ACTIONS_RUNTIME_TOKEN'] as const
beforeAll(() => {
  for (const name of secretNames) process.env[name] = corpusToken
  registerEnvironmentSecrets()
})
afterAll(() => {
  for (const name of secretNames) if (!(name in savedEnv)) delete process.env[name]
  clearSecrets()
  for (const repo of repositories) repo.remove()
  rmSync(folder, { recursive: true, force: true })
})

const small = makeRepository({ base: { 'README.md': '# base\n' }, head: { 'README.md': '# head\n' } })
repositories.push(small)
small.git('commit', '--quiet', '--allow-empty', '-m', 'marker commit')
for (const name of ['checkout', 'outside', 'commands']) mkdirSync(join(folder, name))
corpus = buildCorpus({
  fixtures: fileURLToPath(new URL('../fixtures/onnx', import.meta.url)),
  repository: small.root,
  marker,
  checkout: join(folder, 'checkout'),
  outside: join(folder, 'outside'),
  commandFolder: join(folder, 'commands'),
})

type Observed = 'user-error' | 'accepted' | 'crash' | 'hang'
const counts = new Map<string, number>()
const tally = (family: Family | 'cli', outcome: Observed) => counts.set(`${family} ${outcome}`, (counts.get(`${family} ${outcome}`) ?? 0) + 1)

async function observe(corpusCase: CorpusCase): Promise<{ outcome: Observed; value?: unknown; error?: unknown }> {
  let timer: NodeJS.Timeout | undefined
  const limit = new Promise<'hang'>((resolve) => (timer = setTimeout(() => resolve('hang'), 20_000)))
  try {
    const result = await Promise.race([corpusCase.run().then((value) => ({ value })), limit])
    if (result === 'hang') return { outcome: 'hang' }
    return { outcome: 'accepted', value: result.value }
  } catch (error) {
    return { outcome: error instanceof UserError ? 'user-error' : 'crash', error }
  } finally {
    clearTimeout(timer)
  }
}

describe(`the bad-input corpus (${corpus.length} cases)`, () => {
  it('has at least 300 cases across the nine families', () => {
    expect(corpus.length).toBeGreaterThanOrEqual(300)
    expect(new Set(corpus.map((c) => c.family)).size).toBe(9)
    expect(new Set(corpus.map((c) => `${c.family}: ${c.name}`)).size).toBe(corpus.length)
  })

  it.each(corpus.map((c) => [`${c.family}: ${c.name}`, c] as const))('%s', async (_, corpusCase) => {
    const observed = await observe(corpusCase)
    tally(corpusCase.family, observed.outcome)
    const printed = observed.error === undefined ? '' : cleanOutsideText(describeFailure(observed.error))
    expect(printed).not.toContain(corpusToken)
    expect(printed).not.toContain(outsideSentinel)
    expect(printed).not.toContain('\u001b')
    expect(printed).not.toMatch(/\n\s+at .*:\d+:\d+/)
    if (observed.outcome === 'crash') throw new Error(`crashed: ${String((observed.error as Error)?.stack ?? observed.error)}`)
    expect(observed.outcome, `observed: ${printed}`).toBe(corpusCase.expect.outcome)
    if (corpusCase.expect.outcome === 'user-error') expect((observed.error as UserError).message).toMatch(corpusCase.expect.message)
    else {
      corpusCase.expect.check?.(observed.value)
      expect(JSON.stringify(observed.value ?? null, (_k, v) => (v instanceof Float64Array ? undefined : v))).not.toContain(outsideSentinel)
    }
  })

  it('ran no command through a ref', () => {
    expect(existsSync(marker)).toBe(false)
    expect(existsSync(join(small.root, 'x'))).toBe(false)
  })
})

describe('a sample of hostile repositories through the real CLI process', () => {
  const env = baseEnvironment({ GITHUB_TOKEN: corpusToken, INPUT_TOKEN: corpusToken })
  const sample: { name: string; edit: (root: string) => void; code: number; stderr: RegExp }[] = [
    { name: 'one-row holdout', edit: (root) => writeFileSync(join(root, 'data', 'holdout.csv'), readFileSync(join(root, 'data', 'holdout.csv'), 'utf8').split('\n').slice(0, 2).join('\n')), code: 2, stderr: /head: data\/holdout\.csv has 1 holdout row; the gate needs at least 10/ },
    {
      name: 'no feature column',
      edit: (root) => {
        for (const file of ['train', 'holdout']) {
          const path = join(root, 'data', `${file}.csv`)
          writeFileSync(path, readFileSync(path, 'utf8').split('\n').map((l) => l.split(',').filter((_, i, all) => i === 0 || i === all.length - 1).join(',')).join('\n'))
        }
      },
      code: 2,
      stderr: /head: data\/train\.csv has no feature column/,
    },
    { name: 'policy alias bomb', edit: (root) => writeFileSync(join(root, 'plumbline.yml'), `${smallPolicy()}x: &x [1,1,1,1,1,1,1,1,1,1]\ny: &y [*x,*x,*x,*x,*x,*x,*x,*x,*x,*x]\nz: &z [*y,*y,*y,*y,*y,*y,*y,*y,*y,*y]\nw: &w [*z,*z,*z,*z,*z,*z,*z,*z,*z,*z]\nv: [*w,*w,*w,*w,*w,*w,*w,*w,*w,*w,*w,*w]\n`), code: 2, stderr: /the policy expands to more than 100000 values/ },
    { name: 'policy symlinked to /etc/passwd', edit: (root) => (rmSync(join(root, 'plumbline.yml')), symlinkSync('/etc/passwd', join(root, 'plumbline.yml'))), code: 2, stderr: /The policy file 'plumbline\.yml' points \(through a symlink\) outside the head checkout/ },
    { name: 'infinite distance', edit: (root) => writeFileSync(join(root, 'data', 'train.csv'), readFileSync(join(root, 'data', 'train.csv'), 'utf8').replace(/\n(P\d+),[^,]+,/, '\n$1,inf,')), code: 2, stderr: /'inf' is not a finite number within ±1e100/ },
  ]
  it.each(sample.map((s) => [s.name, s] as const))('%s', async (_, item) => {
    const repo = makeRepository({ base: baseFiles() })
    repositories.push(repo)
    item.edit(repo.root)
    const run = await runSource('cli', ['check', '--base', 'main', '--json', 'r.json'], { cwd: repo.root, env, limitSeconds: 90 })
    tally('cli', run.code === 2 ? 'user-error' : 'crash')
    expect(run.timedOut).toBe(false)
    expect(run.code).toBe(item.code)
    expect(run.stderr).toMatch(item.stderr)
    expect(run.stdout + run.stderr).not.toContain(corpusToken)
    expect(run.stderr).not.toContain('root:x:0:0')
    expect(JSON.parse(readFileSync(join(repo.root, 'r.json'), 'utf8')).verdict).toBe('error')
  })
})

afterAll(() => {
  const lines = [...counts.entries()].sort().map(([key, n]) => `  ${key}: ${n}`)
  process.stderr.write(`bad-input corpus: ${corpus.length} in-process cases + ${5} CLI runs\n${lines.join('\n')}\n`)
})
