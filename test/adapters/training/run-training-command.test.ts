import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { UserError } from '../../../src/core/errors.ts'
import { runTrainingCommand, TRAINING_VARIABLES, type TrainingCommandRequest } from '../../../src/adapters/training/run-training-command.ts'

const LINEAR = fileURLToPath(new URL('../../fixtures/onnx/linear-regressor.onnx', import.meta.url))

let directory: string
beforeEach(() => {
  directory = mkdtempSync(join(tmpdir(), 'plumbline-run-test-'))
})
afterEach(() => rmSync(directory, { recursive: true, force: true }))

const request = (command: string, more: Partial<TrainingCommandRequest> = {}): TrainingCommandRequest => ({
  command,
  cwd: directory,
  timeoutSeconds: 30,
  env: { PLUMBLINE_SIDE: 'base', PLUMBLINE_REFIT: '2', PLUMBLINE_SEED: '77' },
  outputPath: join(directory, 'out', 'model.onnx'),
  label: 'base refit 2',
  ...more,
})

async function rejection(promise: Promise<unknown>): Promise<UserError> {
  const error = await promise.then(() => undefined, (e: unknown) => e)
  expect(error).toBeInstanceOf(UserError)
  return error as UserError
}

const isAlive = (pid: number) => {
  try {
    process.kill(pid, 0)
    return true
  } catch {
    return false
  }
}

describe('runTrainingCommand(request)', () => {
  it('runs the command in cwd with the variables set and returns the model it wrote', async () => {
    const command = `cp '${LINEAR}' "$PLUMBLINE_OUTPUT" && echo "seed $PLUMBLINE_SEED for $PLUMBLINE_SIDE refit $PLUMBLINE_REFIT in $(pwd)"`
    const result = await runTrainingCommand(request(`mkdir -p out && ${command}`))
    expect(result.bytes).toEqual(new Uint8Array(readFileSync(LINEAR)))
    expect(result.logTail).toBe(`seed 77 for base refit 2 in ${directory}`)
    expect(result.seconds).toBeGreaterThan(0)
  })

  it('does not pass the action’s inputs or tokens on to the command', async () => {
    process.env.INPUT_GITHUB_TOKEN = 'secret-input'
    process.env.ACTIONS_RUNTIME_TOKEN = 'secret-runtime'
    try {
      const result = await runTrainingCommand(
        request(`mkdir -p out && echo "[$INPUT_GITHUB_TOKEN$ACTIONS_RUNTIME_TOKEN] $PLUMBLINE_SIDE" > "$PLUMBLINE_OUTPUT"; cat "$PLUMBLINE_OUTPUT"`),
      )
      expect(result.logTail).toBe('[] base')
    } finally {
      delete process.env.INPUT_GITHUB_TOKEN
      delete process.env.ACTIONS_RUNTIME_TOKEN
    }
  })

  it('refuses a directory that does not exist', async () => {
    const error = await rejection(runTrainingCommand(request('true', { cwd: join(directory, 'missing') })))
    expect(error.message).toBe(`The training command for base refit 2 cannot run: its directory ${directory}/missing does not exist.`)
  })

  it('names every variable with the PLUMBLINE_ prefix', () => {
    expect(TRAINING_VARIABLES.map((v) => v.name)).toEqual([
      'PLUMBLINE_SEED', 'PLUMBLINE_OUTPUT', 'PLUMBLINE_TRAIN', 'PLUMBLINE_HOLDOUT', 'PLUMBLINE_LEAVE_OUT', 'PLUMBLINE_SIDE', 'PLUMBLINE_REFIT',
    ])
  })

  it('fails on a non-zero exit with the label, the command, the code and the last 60 lines', async () => {
    const command = `for i in $(seq 1 70); do echo "line $i"; done; echo 'bad value in row 7' >&2; exit 3`
    const error = await rejection(runTrainingCommand(request(command)))
    const lines = Array.from({ length: 59 }, (_, i) => `line ${i + 12}`).join('\n')
    expect(error.message).toBe(
      `The training command for base refit 2 exited with code 3.\nCommand: ${command}\nThe last 60 lines of its output:\n${lines}\nbad value in row 7`,
    )
    expect(error.fix).toBe(
      `To reproduce it, run the command in ${directory} with PLUMBLINE_SIDE=base PLUMBLINE_REFIT=2 PLUMBLINE_SEED=77 PLUMBLINE_OUTPUT=${directory}/out/model.onnx`,
    )
  })

  it('kills the whole process group after timeoutSeconds', async () => {
    const pidFile = join(directory, 'sleeper.pid')
    const command = `sleep 30 & echo $! > '${pidFile}'; echo waiting; wait`
    const error = await rejection(runTrainingCommand(request(command, { timeoutSeconds: 1 })))
    expect(error.message).toBe(`The training command for base refit 2 timed out after 1 s.\nCommand: ${command}\nThe last line of its output:\nwaiting`)
    expect(error.fix).toBe("Make the command faster, or raise 'model.train.timeout_seconds' (now 1) in plumbline.yml.")
    // The background sleep was in the command's group: it must be gone (allowing for its reaping).
    const sleeper = Number(readFileSync(pidFile, 'utf8'))
    for (let i = 0; i < 50 && isAlive(sleeper); i++) await new Promise((r) => setTimeout(r, 100))
    expect(isAlive(sleeper)).toBe(false)
  })

  it('fails when the command writes no model, even if a stale file was there before', async () => {
    const outputPath = join(directory, 'model.onnx')
    writeFileSync(outputPath, 'stale')
    const error = await rejection(runTrainingCommand(request('true', { outputPath })))
    expect(error.message).toBe('The training command for base refit 2 finished but wrote no model to $PLUMBLINE_OUTPUT.\nCommand: true\nIt printed nothing.')
    expect(error.fix).toBe(`Make the command write its ONNX model to the path it is given in $PLUMBLINE_OUTPUT (this time ${outputPath}).`)
    expect(existsSync(outputPath)).toBe(false)
  })

  it('stops the command when its signal aborts, giving the reason', async () => {
    const stop = new AbortController()
    const running = runTrainingCommand(request('echo started; sleep 30', { signal: stop.signal }))
    setTimeout(() => stop.abort('the training command for head refit 0 failed'), 200)
    const error = await rejection(running)
    expect(error.message.split('\n')[0]).toBe('The training command for base refit 2 was stopped because the training command for head refit 0 failed.')
  })

  it('keeps only the end of a very long output', async () => {
    const error = await rejection(runTrainingCommand(request(`head -c 3000000 /dev/zero | tr '\\0' x; echo; echo last; exit 1`)))
    const shown = error.message.split('\n').slice(3)
    expect(shown[shown.length - 1]).toBe('last')
    expect(error.message.length).toBeLessThan(20_000)
  })
})
