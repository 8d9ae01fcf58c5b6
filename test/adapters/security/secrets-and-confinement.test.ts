/**
 * Secrets and confinement with real files, symlinks and FIFOs, the real prepare runner, and the real
 * CLI and action processes (from source, test/helpers/run-process.ts) on generated repositories.
 * What must hold (issue 12): no token in any output, no file outside the checkout read or written,
 * no FIFO or device read, no hang on a grandchild that keeps the output open.
 */
import { execFileSync } from 'node:child_process'
import { existsSync, mkdirSync, mkdtempSync, readFileSync, realpathSync, rmSync, symlinkSync, writeFileSync } from 'node:fs'
import { createServer, type Server, type Socket } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runPrepare } from '../../../src/adapters/check/run-prepare.ts'
import { readConfinedFile, resolveConfinedOutput } from '../../../src/adapters/files/confined-file.ts'
import { childEnvironment } from '../../../src/adapters/security/child-environment.ts'
import { clearSecrets, redactDeep, redactSecrets, registerSecret } from '../../../src/adapters/security/secrets.ts'
import { cleanOutsideText } from '../../../src/adapters/security/terminal-text.ts'
import { UserError } from '../../../src/core/errors.ts'
import { baseFiles, makeRepository, smallPolicy, type TestRepository } from '../../helpers/make-repository.ts'
import { baseEnvironment, runSource } from '../../helpers/run-process.ts'
import { startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'

const token = 'ghs_sEcReT_t0ken_for_the_tests_7731'
const folder = realpathSync(mkdtempSync(join(tmpdir(), 'plumbline-sec-')))
afterAll(() => rmSync(folder, { recursive: true, force: true }))

async function userError(promise: Promise<unknown>): Promise<UserError> {
  const error = await promise.then(() => undefined, (e: unknown) => e)
  if (!(error instanceof UserError)) throw new Error(`expected a UserError, got ${String(error)}`)
  return error
}

describe('childEnvironment', () => {
  it('keeps PATH, HOME, locale and PLUMBLINE_ variables; drops INPUT_*, ACTIONS_*, GITHUB_TOKEN and anything secret-looking', () => {
    const env = childEnvironment(
      { PLUMBLINE_SIDE: 'head', PLUMBLINE_API_KEY: 'x' },
      {
        source: {
          PATH: '/usr/bin',
          HOME: '/home/u',
          LANG: 'C.UTF-8',
          LC_ALL: 'C',
          TMPDIR: '/tmp',
          INPUT_TOKEN: token,
          GITHUB_TOKEN: token,
          GH_TOKEN: token,
          ACTIONS_RUNTIME_TOKEN: token,
          AWS_SECRET_ACCESS_KEY: token,
          NPM_CONFIG_AUTH: token,
          PLUMBLINE_TOKEN: token,
          PLUMBLINE_THREADS: '1',
          GITHUB_WORKSPACE: '/w',
          SSH_AUTH_SOCK: '/run/agent',
        },
      },
    )
    expect(env).toEqual({ PATH: '/usr/bin', HOME: '/home/u', LANG: 'C.UTF-8', LC_ALL: 'C', TMPDIR: '/tmp', PLUMBLINE_THREADS: '1', PLUMBLINE_SIDE: 'head' })
    expect(childEnvironment({}, { purpose: 'git', source: { SSH_AUTH_SOCK: '/run/agent', GIT_TOKEN: token } })).toEqual({ SSH_AUTH_SOCK: '/run/agent' })
  })
})

describe('redactSecrets and cleanOutsideText', () => {
  it('masks a registered value and its JSON, URL and base64 spellings, in nested report values too', () => {
    clearSecrets()
    registerSecret('abc') // too short to register
    registerSecret('p@ss/word"x')
    expect(redactSecrets('a p@ss/word"x b p%40ss%2Fword%22x c p@ss/word\\"x abc')).toBe('a *** b *** c *** abc')
    expect(redactDeep({ list: [{ message: 'got p@ss/word"x' }], n: 3 })).toEqual({ list: [{ message: 'got ***' }], n: 3 })
    clearSecrets()
  })

  it('removes escape sequences and other control characters from outside text', () => {
    expect(cleanOutsideText('ok\u001b[2J\u001b]0;pwned\u0007\rline\u0000 two\n\tend')).toBe('ok\uFFFDline\uFFFD two\n\tend')
  })
})

describe('readConfinedFile and resolveConfinedOutput', () => {
  let root: string
  let outside: string
  beforeAll(() => {
    root = join(folder, 'checkout')
    outside = join(folder, 'outside.csv')
    mkdirSync(join(root, 'data'), { recursive: true })
    writeFileSync(outside, 'secret_column,late\n1,0\n')
    writeFileSync(join(root, 'data', 'train.csv'), 'a,late\n1,0\n')
    symlinkSync(outside, join(root, 'data', 'link.csv'))
    symlinkSync(folder, join(root, 'up'))
    symlinkSync('/dev/zero', join(root, 'data', 'zero.csv'))
    symlinkSync('/proc/self/environ', join(root, 'environ.yml'))
    execFileSync('mkfifo', [join(root, 'data', 'fifo.csv')])
  })
  const read = (path: string, maxBytes = 1024) =>
    readConfinedFile({ key: 'data.train', path, root, rootName: 'the head checkout' }, { maxBytes, what: 'data file', missing: () => new UserError(`missing ${path}`) })

  it('reads a regular file inside the root', async () => {
    expect((await read('data/train.csv')).toString()).toBe('a,late\n1,0\n')
  })

  it.each([
    ['../outside.csv', "data.train '../outside.csv' lies outside the head checkout"],
    [join(folder, 'outside.csv'), `data.train '${join(folder, 'outside.csv')}' lies outside the head checkout`],
    ['/etc/passwd', "data.train '/etc/passwd' lies outside the head checkout"],
    ['data/link.csv', "data.train 'data/link.csv' points (through a symlink) outside the head checkout"],
    ['up/outside.csv', "data.train 'up/outside.csv' points (through a symlink) outside the head checkout"],
    ['data/zero.csv', "data.train 'data/zero.csv' points (through a symlink) outside the head checkout"],
    ['environ.yml', "data.train 'environ.yml' points (through a symlink) outside the head checkout"],
    ['up/missing.csv', "data.train 'up/missing.csv' points (through a symlinked folder) outside the head checkout"],
  ])('refuses %s, naming the key', async (path, message) => {
    const error = await userError(read(path))
    expect(error.message).toBe(`${message}; plumbline reads and writes only inside it.`)
    expect(error.message).not.toContain('secret_column')
  })

  it('refuses a FIFO without blocking, a directory, and more bytes than the limit', async () => {
    expect((await userError(read('data/fifo.csv'))).message).toBe("data.train 'data/fifo.csv' is a FIFO (named pipe), not a regular file; plumbline reads a data file only from a regular file.")
    expect((await userError(read('data'))).message).toBe("data.train 'data' is a directory, not a regular file; plumbline reads a data file only from a regular file.")
    expect((await userError(read('data/train.csv', 4))).message).toBe("data.train 'data/train.csv' is larger than plumbline reads for a data file (0.0 MiB).")
  })

  it('refuses to write outside the workspace or onto a directory', async () => {
    const out = (path: string) => resolveConfinedOutput({ key: "Input 'report'", path, root, rootName: 'the workspace' }, { confine: true })
    expect(await out('reports/r.json')).toBe(join(root, 'reports', 'r.json'))
    expect((await userError(out('../r.json'))).message).toBe("Input 'report' '../r.json' lies outside the workspace; plumbline reads and writes only inside it.")
    expect((await userError(out('up/r.json'))).message).toBe("Input 'report' 'up/r.json' points (through a symlinked folder) outside the workspace; plumbline reads and writes only inside it.")
    expect((await userError(out('data'))).message).toBe("Input 'report' 'data' is a directory; plumbline writes a report file there.")
  })
})

describe('runPrepare', () => {
  it('gives the command no token, and a failing command’s output shows none', async () => {
    const saved = { ...process.env }
    Object.assign(process.env, { INPUT_TOKEN: token, GITHUB_TOKEN: token, ACTIONS_RUNTIME_TOKEN: token })
    try {
      const error = await userError(runPrepare({ command: 'echo "[$INPUT_TOKEN|$GITHUB_TOKEN|$ACTIONS_RUNTIME_TOKEN]"; env; exit 3', cwd: folder, timeoutSeconds: 30, side: 'head' }))
      expect(error.message).toMatch(/^prepare on the head side exited with code 3: /)
      expect(error.message).toContain('[||]')
      expect(error.message).toContain('PLUMBLINE_SIDE=head')
      expect(error.message).not.toContain(token)
    } finally {
      for (const name of ['INPUT_TOKEN', 'GITHUB_TOKEN', 'ACTIONS_RUNTIME_TOKEN']) if (!(name in saved)) delete process.env[name]
    }
  })

  it('names the signal that killed the command, and strips escape sequences from its output', async () => {
    const error = await userError(runPrepare({ command: "printf 'a\\033[2Jb\\n'; kill -TERM $$", cwd: folder, timeoutSeconds: 30, side: 'base' }))
    expect(error.message).toBe('prepare on the base side was killed by signal SIGTERM: printf \'a\\033[2Jb\\n\'; kill -TERM $$\n--- last lines of its output ---\nab')
  })

  it('ends when the command exits although a setsid grandchild still holds its output, and on timeout', async () => {
    const started = performance.now()
    await runPrepare({ command: 'setsid sleep 20 & echo started', cwd: folder, timeoutSeconds: 30, side: 'head' })
    expect((performance.now() - started) / 1000).toBeLessThan(10)
    const timedOut = await userError(runPrepare({ command: 'setsid sleep 20 & sleep 20', cwd: folder, timeoutSeconds: 1, side: 'head' }))
    expect(timedOut.message).toMatch(/^prepare on the head side timed out after 1 s/)
    expect((performance.now() - started) / 1000).toBeLessThan(15)
  })
})

describe('the real CLI on hostile repositories', () => {
  const repositories: TestRepository[] = []
  afterAll(() => repositories.forEach((r) => r.remove()))
  const repository = (policy: string) => {
    const repo = makeRepository({ base: baseFiles({ policy }), head: { 'plumbline.yml': policy } })
    repositories.push(repo)
    return repo
  }
  const env = baseEnvironment({ GITHUB_TOKEN: token, INPUT_TOKEN: token, GH_TOKEN: token })
  const noSecret = (repo: TestRepository, run: { stdout: string; stderr: string }, files: string[]) => {
    expect(run.stdout + run.stderr).not.toContain(token)
    for (const file of files) if (existsSync(join(repo.root, file))) expect(readFileSync(join(repo.root, file), 'utf8')).not.toContain(token)
  }

  it('a prepare that prints the environment and fails: exit 2, the token in no output', async () => {
    const repo = repository(`${smallPolicy()}prepare:\n  command: echo "$GITHUB_TOKEN $INPUT_TOKEN"; env; exit 1\n`)
    const run = await runSource('cli', ['check', '--base', 'main', '--json', 'r.json', '--markdown', 'r.md'], { cwd: repo.root, env })
    expect(run.code).toBe(2)
    expect(run.stderr).toContain('prepare on the base side exited with code 1')
    noSecret(repo, run, ['r.json', 'r.md'])
    expect(JSON.parse(readFileSync(join(repo.root, 'r.json'), 'utf8')).verdict).toBe('error')
  })

  it('a data file whose column is named by the token: the gate runs and the name is redacted from every output', async () => {
    const repo = repository(smallPolicy())
    const train = join(repo.root, 'data', 'train.csv')
    const lines = readFileSync(train, 'utf8').split('\n')
    lines[0] = lines[0].replace('rain_forecast_mm', token)
    writeFileSync(train, lines.join('\n'))
    const holdout = join(repo.root, 'data', 'holdout.csv')
    writeFileSync(holdout, readFileSync(holdout, 'utf8').replace('rain_forecast_mm', token))
    const run = await runSource('cli', ['check', '--base', 'main', '--json', 'r.json', '--markdown', 'r.md'], { cwd: repo.root, env })
    expect([0, 1]).toContain(run.code)
    expect(run.stdout).toContain('***')
    expect(readFileSync(join(repo.root, 'r.md'), 'utf8')).toContain('\\*\\*\\*')
    noSecret(repo, run, ['r.json', 'r.md'])
  })

  it('refuses --policy outside the checkout and a policy symlinked to /proc/self/environ, quoting nothing of them', async () => {
    const repo = repository(smallPolicy())
    const up = await runSource('cli', ['check', '--base', 'main', '--policy', '../../../../../../etc/passwd'], { cwd: repo.root, env })
    expect(up.code).toBe(2)
    expect(up.stderr).toContain("The policy file '../../../../../../etc/passwd' lies outside the head checkout")
    expect(up.stderr).not.toContain('root:')
    rmSync(join(repo.root, 'plumbline.yml'))
    symlinkSync('/proc/self/environ', join(repo.root, 'plumbline.yml'))
    const environ = await runSource('cli', ['check', '--base', 'main'], { cwd: repo.root, env })
    expect(environ.code).toBe(2)
    expect(environ.stderr).toContain("The policy file 'plumbline.yml' points (through a symlink) outside the head checkout")
    noSecret(repo, environ, [])
  })

  it('refuses data symlinked outside, an absolute data path and a FIFO holdout, each naming the key, within seconds', async () => {
    writeFileSync(join(folder, 'elsewhere.csv'), 'hidden_outside_column,late\n1,0\n')
    const repo = repository(smallPolicy())
    rmSync(join(repo.root, 'data', 'train.csv'))
    symlinkSync(join(folder, 'elsewhere.csv'), join(repo.root, 'data', 'train.csv'))
    const linked = await runSource('cli', ['check', '--base', 'main'], { cwd: repo.root, env })
    expect(linked.code).toBe(2)
    expect(linked.stderr).toContain("data.train 'data/train.csv' points (through a symlink) outside the head checkout")
    expect(linked.stderr).not.toContain('hidden_outside_column')

    const absolute = repository(smallPolicy().replace('train: data/train.csv', `train: ${join(folder, 'elsewhere.csv')}`))
    const abs = await runSource('cli', ['check', '--base', 'main'], { cwd: absolute.root, env })
    expect(abs.code).toBe(2)
    expect(abs.stderr).toContain(`data.train '${join(folder, 'elsewhere.csv')}' lies outside the base checkout`)

    const fifo = repository(smallPolicy())
    rmSync(join(fifo.root, 'data', 'holdout.csv'))
    execFileSync('mkfifo', [join(fifo.root, 'data', 'holdout.csv')])
    const piped = await runSource('cli', ['check', '--base', 'main'], { cwd: fifo.root, env, limitSeconds: 60 })
    expect(piped.timedOut).toBe(false)
    expect(piped.code).toBe(2)
    expect(piped.stderr).toContain("data.holdout 'data/holdout.csv' is a FIFO (named pipe), not a regular file")
  })

  it('--json naming a directory and --markdown /dev/full: exit 2 and no report file claiming a verdict', async () => {
    const repo = repository(smallPolicy())
    mkdirSync(join(repo.root, 'out'))
    const directory = await runSource('cli', ['check', '--base', 'main', '--json', 'out'], { cwd: repo.root, env })
    expect(directory.code).toBe(2)
    expect(directory.stderr).toContain("--json 'out' is a directory; plumbline writes a report file there.")
    const full = await runSource('cli', ['check', '--base', 'main', '--json', 'r.json', '--markdown', '/dev/full'], { cwd: repo.root, env })
    expect(full.code).toBe(2)
    expect(full.stderr).toContain('Could not write --markdown /dev/full: no space is left on the disk (ENOSPC). No report file was written.')
    expect(existsSync(join(repo.root, 'r.json'))).toBe(false)
  })

  it('--json in a folder that cannot be made (/proc, where a recursive mkdir never returns) or under a file: exit 2 before the run', async () => {
    const repo = repository(smallPolicy())
    const proc = await runSource('cli', ['check', '--base', 'main', '--json', '/proc/plumbline-none/r.json'], { cwd: repo.root, env, limitSeconds: 60 })
    expect(proc.timedOut).toBe(false)
    expect(proc.code).toBe(2)
    expect(proc.stderr).toContain('Could not write --json /proc/plumbline-none/r.json: the folder cannot be created there (ENOENT).')
    // Refused before anything was measured: no progress line of a refit.
    expect(proc.stderr).not.toContain('refit')
    const underFile = await runSource('cli', ['check', '--base', 'main', '--markdown', 'plumbline.yml/comment.md'], { cwd: repo.root, env, limitSeconds: 60 })
    expect(underFile.code).toBe(2)
    expect(underFile.stderr).toContain('Could not write --markdown plumbline.yml/comment.md: a part of the path is a file, not a folder (ENOTDIR).')
  })
})

describe('the real action on hostile inputs', () => {
  let fake: FakeGitHub
  let silent: Server
  let silentUrl: string
  const sockets: Socket[] = []
  const owner = 'northwind-parcel'
  const repo = 'late-deliveries'
  beforeAll(async () => {
    fake = await startFakeGitHub({ token, owner, repo })
    // Accepts connections and never answers.
    silent = createServer((socket) => sockets.push(socket))
    await new Promise<void>((done) => silent.listen(0, '127.0.0.1', done))
    silentUrl = `http://127.0.0.1:${(silent.address() as { port: number }).port}`
  })
  afterAll(async () => {
    await fake.close()
    for (const socket of sockets) socket.destroy()
    await new Promise((done) => silent.close(done))
  })

  function actionEnv(workspace: string, inputs: Record<string, string>, apiUrl = fake.url): Record<string, string> {
    const run = mkdtempSync(join(folder, 'run-'))
    const event = { action: 'opened', number: 5, pull_request: { number: 5, base: { sha: 'a'.repeat(40), repo: { full_name: `${owner}/${repo}` } }, head: { sha: 'b'.repeat(40), ref: 'x', repo: { full_name: `${owner}/${repo}` } } }, repository: { full_name: `${owner}/${repo}` } }
    writeFileSync(join(run, 'event.json'), JSON.stringify(event))
    writeFileSync(join(run, 'output.txt'), '')
    writeFileSync(join(run, 'summary.md'), '')
    const env: Record<string, string> = baseEnvironment({
      GITHUB_ACTIONS: 'true',
      GITHUB_EVENT_NAME: 'pull_request',
      GITHUB_EVENT_PATH: join(run, 'event.json'),
      GITHUB_REPOSITORY: `${owner}/${repo}`,
      GITHUB_API_URL: apiUrl,
      GITHUB_STEP_SUMMARY: join(run, 'summary.md'),
      GITHUB_OUTPUT: join(run, 'output.txt'),
      GITHUB_WORKSPACE: workspace,
      RUNNER_TEMP: run,
      GITHUB_TOKEN: token,
      PLUMBLINE_API_TIMEOUT_SECONDS: '1',
      INPUT_TOKEN: token,
    })
    for (const [name, value] of Object.entries(inputs)) env[`INPUT_${name.toUpperCase()}`] = value
    return env
  }
  const everything = (env: Record<string, string>, run: { stdout: string; stderr: string }) =>
    [run.stdout, run.stderr, readFileSync(env.GITHUB_OUTPUT, 'utf8'), readFileSync(env.GITHUB_STEP_SUMMARY, 'utf8'), ...[...fake.comments.values()].flat().map((c) => c.body)]
      .join('\n')
      // The one line that must hold it: the workflow command that tells the runner to mask it.
      .replace(`::add-mask::${token}`, '')

  it('publish mode: a report symlinked to /etc/passwd and one nested 100 000 levels deep are refused; the token is in no output', async () => {
    const workspace = mkdtempSync(join(folder, 'ws-'))
    symlinkSync('/etc/passwd', join(workspace, 'passwd.json'))
    const linkEnv = actionEnv(workspace, { mode: 'publish', report: 'passwd.json' })
    const linked = await runSource('action', [], { cwd: workspace, env: linkEnv })
    expect(linked.code).toBe(1)
    expect(linked.stdout).toContain("Input 'report' 'passwd.json' points (through a symlink) outside the workspace")
    expect(everything(linkEnv, linked)).not.toContain('root:')
    expect(readFileSync(linkEnv.GITHUB_OUTPUT, 'utf8')).toContain('verdict<<')

    writeFileSync(join(workspace, 'deep.json'), `${'['.repeat(100_000)}${']'.repeat(100_000)}`)
    const deepEnv = actionEnv(workspace, { mode: 'publish', report: 'deep.json' })
    const deep = await runSource('action', [], { cwd: workspace, env: deepEnv })
    expect(deep.code).toBe(1)
    expect(deep.stdout).toContain('deep.json nests arrays or objects deeper than 64 levels')
    expect(deep.seconds).toBeLessThan(30)
    expect(everything(deepEnv, deep)).not.toContain(token)
  })

  it('a binary event file: the error verdict output and a failed step naming the file, no throw at import', async () => {
    const workspace = mkdtempSync(join(folder, 'ws-'))
    const env = actionEnv(workspace, {})
    writeFileSync(env.GITHUB_EVENT_PATH, Buffer.from([0xff, 0xfe, 0x00, 0x7b, 0x22, 0x01]))
    const run = await runSource('action', [], { cwd: workspace, env })
    expect(run.code).toBe(1)
    expect(readFileSync(env.GITHUB_OUTPUT, 'utf8')).toMatch(/verdict<<(\S+)\nerror\n/)
    expect(run.stdout).toContain(`::error::No verdict: the check could not run (The event payload at ${env.GITHUB_EVENT_PATH} is not valid JSON)`)
    expect(everything(env, run)).not.toContain(token)
  })

  it('check mode: a report copy outside the workspace is refused; an API that never answers does not hang the step', async () => {
    const workspace = mkdtempSync(join(folder, 'ws-'))
    const env = actionEnv(workspace, { report: '../escaped.json' }, silentUrl)
    const run = await runSource('action', [], { cwd: workspace, env, limitSeconds: 120 })
    expect(run.timedOut).toBe(false)
    expect(run.code).toBe(1)
    expect(existsSync(join(folder, 'escaped.json'))).toBe(false)
    expect(readFileSync(env.GITHUB_OUTPUT, 'utf8')).toMatch(/verdict<<(\S+)\nerror\n/)
    expect(run.stdout).toContain('Could not post the pull-request comment on #5')
    expect(everything(env, run)).not.toContain(token)
  })
})
