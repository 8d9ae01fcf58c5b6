/**
 * Inputs that used to hang or exhaust memory (issue 12) end within their limits: a training command
 * whose setsid grandchild keeps the output open, $PLUMBLINE_OUTPUT replaced by a link to /dev/zero
 * or a FIFO, a YAML alias bomb, an unknown YAML tag, an oversized policy.
 */
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { runTrainingCommand } from '../../../src/adapters/training/run-training-command.ts'
import { UserError } from '../../../src/core/errors.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'
import { smallPolicy } from '../../helpers/make-repository.ts'

const folder = mkdtempSync(join(tmpdir(), 'plumbline-hangs-'))
afterAll(() => rmSync(folder, { recursive: true, force: true }))

async function userError(promise: Promise<unknown>): Promise<UserError> {
  const error = await promise.then(() => undefined, (e: unknown) => e)
  if (!(error instanceof UserError)) throw new Error(`expected a UserError, got ${String(error)}`)
  return error
}
function policyError(text: string): string {
  try {
    parsePolicy(text, { source: 'plumbline.yml' })
  } catch (error) {
    if (error instanceof UserError) return error.message
    throw error
  }
  throw new Error('expected a UserError')
}

const train = (command: string, timeoutSeconds = 20) =>
  runTrainingCommand({ command, cwd: folder, timeoutSeconds, env: { PLUMBLINE_SIDE: 'head' }, outputPath: join(folder, 'model.onnx'), label: 'head refit 0' })

describe('the training command', () => {
  it('ends within its timeout although a setsid grandchild holds the output open', async () => {
    const started = performance.now()
    const error = await userError(train('setsid sleep 30 & sleep 30', 1))
    expect(error.message).toMatch(/^The training command for head refit 0 timed out after 1 s\./)
    // A guard against waiting for the grandchild (30 s), not a speed measurement: loose for a loaded machine.
    expect((performance.now() - started) / 1000).toBeLessThan(20)
  })

  it('refuses a $PLUMBLINE_OUTPUT replaced by a link to /dev/zero, or by a FIFO, without reading it', async () => {
    const linked = await userError(train('ln -s /dev/zero "$PLUMBLINE_OUTPUT"'))
    expect(linked.message).toBe('The model the training command for head refit 0 wrote to $PLUMBLINE_OUTPUT is a symlink; plumbline reads only a regular file there.')
    const fifo = await userError(train('mkfifo "$PLUMBLINE_OUTPUT"'))
    expect(fifo.message).toBe(
      'The model the training command for head refit 0 wrote to $PLUMBLINE_OUTPUT is a FIFO (named pipe), not a regular file; plumbline reads a ONNX model only from a regular file.',
    )
  })

  it('names the signal when the command is killed', async () => {
    const error = await userError(train('kill -KILL $$'))
    expect(error.message).toMatch(/^The training command for head refit 0 was killed by signal SIGKILL\./)
  })
})

describe('parsePolicy on hostile YAML', () => {
  it('refuses an alias bomb instead of expanding it', () => {
    const levels = ['a: &a [x, x, x, x, x, x, x, x, x, x]']
    for (let i = 1; i <= 9; i++) levels.push(`${String.fromCharCode(97 + i)}: &${String.fromCharCode(97 + i)} [${Array(10).fill(`*${String.fromCharCode(96 + i)}`).join(', ')}]`)
    const started = performance.now()
    expect(policyError(`${levels.join('\n')}\n`)).toBe('plumbline.yml: the policy expands to more than 100000 values (through YAML aliases or nesting); a policy is far smaller.')
    // A guard against expanding the 10^10 values, not a speed measurement: loose for a loaded machine.
    expect(performance.now() - started).toBeLessThan(20_000)
  })

  it('refuses an unknown tag instead of dropping it', () => {
    expect(policyError(`${smallPolicy()}prepare:\n  command: !!python/object:os.system echo\n`)).toMatch(
      /^plumbline\.yml:\d+:\d+: the YAML tag 'tag:yaml\.org,2002:python\/object:os\.system' is not allowed; a policy holds plain text, lists and mappings\.$/,
    )
  })

  it('refuses a policy longer than a mebibyte, and quotes a binary top level only as a short escaped excerpt', () => {
    expect(policyError(`# ${'x'.repeat(1024 * 1024)}\n`)).toBe('plumbline.yml is 1048579 characters long; a policy is at most 1048576.')
    const binary = policyError(`\u001b[2J${'GITHUB_TOKEN=ghs_abc\u0000'.repeat(20)}`)
    expect(binary).toBe("plumbline.yml:1:1: the top level must be a mapping of keys such as 'version: 1'; got '\\u001b[2JGITHUB_TOKEN=ghs_abc\\u0000GITHUB_TOKEN=gh…'.")
  })
})
