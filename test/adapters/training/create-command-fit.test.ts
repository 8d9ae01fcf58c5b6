import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { FeatureInfo } from '../../../src/core/data/dataset.ts'
import { UserError } from '../../../src/core/errors.ts'
import type { FitRequest } from '../../../src/core/models/model.ts'
import { createCommandFit, type CommandFitOptions } from '../../../src/adapters/training/create-command-fit.ts'

const fixture = (name: string) => fileURLToPath(new URL(`../../fixtures/onnx/${name}`, import.meta.url))
const numeric = (name: string): FeatureInfo => ({ name, kind: 'numeric' })
const FEATURES: FeatureInfo[] = [
  numeric('distance_km'), numeric('stop_count'), numeric('hour'), numeric('weight_kg'),
  { name: 'region', kind: 'categorical', categories: ['east', 'north', 'south'] },
]

let directory: string
let temporaryRoot: string
beforeEach(() => {
  directory = mkdtempSync(join(tmpdir(), 'plumbline-fit-test-'))
  temporaryRoot = join(directory, 'tmp')
  mkdirSync(temporaryRoot)
})
afterEach(() => rmSync(directory, { recursive: true, force: true }))

const fitWith = (command: string, more: Partial<CommandFitOptions> = {}) =>
  createCommandFit({
    command,
    timeoutSeconds: 30,
    parallel: 2,
    sides: {
      base: { cwd: directory, train: 'data/train.csv', holdout: 'data/holdout.csv' },
      head: { cwd: directory, train: 'data/train-head.csv', holdout: 'data/holdout.csv' },
    },
    task: 'regression',
    features: FEATURES,
    temporaryRoot,
    ...more,
  })

const refit = (side: FitRequest['side'], n: number, leaveOut: string[] = []): FitRequest => ({ side, seed: 1000 + n, refit: n, leaveOut })
const logLines = () => readFileSync(join(directory, 'log'), 'utf8').trim().split('\n')

describe('createCommandFit(options)', () => {
  it('runs the command once per request with its variables and loads the model it writes', async () => {
    const fit = fitWith(
      `echo "$PLUMBLINE_SIDE $PLUMBLINE_REFIT $PLUMBLINE_SEED $PLUMBLINE_TRAIN $PLUMBLINE_HOLDOUT [$PLUMBLINE_LEAVE_OUT] $PLUMBLINE_OUTPUT" >> log; cp '${fixture('per-column-regressor.onnx')}' "$PLUMBLINE_OUTPUT"`,
    )
    const model = await fit(refit('head', 3, ['hour']))
    expect(model.kind).toBe('onnx')
    expect(model.featureNames).toEqual(['distance_km', 'weight_kg', 'stop_count', 'region'])
    const [side, n, seed, train, holdout, leaveOut, output] = logLines()[0].split(' ')
    expect([side, n, seed, train, holdout, leaveOut]).toEqual(['head', '3', '1003', 'data/train-head.csv', 'data/holdout.csv', '[hour]'])
    // The temporary directory the model was written into is gone, and nothing else is left.
    expect(dirname(output).startsWith(temporaryRoot)).toBe(true)
    expect(existsSync(dirname(output))).toBe(false)
    expect(readdirSync(temporaryRoot)).toEqual([])
  })

  it('joins several left-out columns with commas and refuses a refit that still reads one of them', async () => {
    const fit = fitWith(`echo "$PLUMBLINE_LEAVE_OUT" >> log; cp '${fixture('per-column-regressor.onnx')}' "$PLUMBLINE_OUTPUT"`)
    const error = await fit(refit('base', 0, ['weight_kg', 'hour'])).then(() => undefined, (e: unknown) => e)
    expect(logLines()).toEqual(['weight_kg,hour'])
    expect(error).toBeInstanceOf(UserError)
    expect((error as UserError).message.split('\n')[0]).toBe(
      "The ONNX model '$PLUMBLINE_OUTPUT of base refit 0 without weight_kg, hour' has an input 'weight_kg' that matches no data column.",
    )
  })

  it('runs at most `parallel` commands at once (from the start and end times the commands write)', async () => {
    const fit = fitWith(
      `echo "start $(date +%s%N)" >> log; sleep 0.3; echo "end $(date +%s%N)" >> log; cp '${fixture('linear-regressor.onnx')}' "$PLUMBLINE_OUTPUT"`,
    )
    const models = await Promise.all([0, 1, 2, 3, 4].map((n) => fit(refit(n % 2 ? 'head' : 'base', n))))
    expect(models).toHaveLength(5)
    const events = logLines()
      .map((line) => line.split(' '))
      .map(([what, nanoseconds]) => ({ time: BigInt(nanoseconds), step: what === 'start' ? 1 : -1 }))
      .sort((a, b) => (a.time < b.time ? -1 : a.time > b.time ? 1 : a.step - b.step))
    expect(events).toHaveLength(10)
    let running = 0
    let most = 0
    for (const event of events) {
      running += event.step
      most = Math.max(most, running)
    }
    expect(most).toBe(2)
  })

  it('fails the whole run on one failure: queued fits do not run and the error names the first failure', async () => {
    const fit = fitWith(
      `echo "ran $PLUMBLINE_REFIT" >> log; if [ "$PLUMBLINE_REFIT" = 0 ]; then echo 'no rows left after filtering'; exit 3; fi; cp '${fixture('linear-regressor.onnx')}' "$PLUMBLINE_OUTPUT"`,
      { parallel: 1 },
    )
    const results = await Promise.allSettled([0, 1, 2].map((n) => fit(refit('base', n))))
    expect(results.map((r) => r.status)).toEqual(['rejected', 'rejected', 'rejected'])
    const reasons = results.map((r) => (r as PromiseRejectedResult).reason as UserError)
    expect(reasons[0].message.split('\n')[0]).toBe('The training command for base refit 0 exited with code 3.')
    expect(reasons[1].message).toBe('The training command for base refit 1 was not run, because the training command for base refit 0 failed.')
    expect(reasons[2].message).toBe('The training command for base refit 2 was not run, because the training command for base refit 0 failed.')
    expect(logLines()).toEqual(['ran 0'])
    // A fit asked for after the failure does not run either.
    await expect(fit(refit('head', 0))).rejects.toThrow('was not run, because the training command for base refit 0 failed.')
    expect(readdirSync(temporaryRoot)).toEqual([])
  })

  it('stops commands still running when another fit fails', async () => {
    const fit = fitWith(`if [ "$PLUMBLINE_REFIT" = 0 ]; then sleep 0.2; exit 1; fi; sleep 30`, { parallel: 2 })
    const results = await Promise.allSettled([fit(refit('base', 0)), fit(refit('head', 1))])
    const stopped = (results[1] as PromiseRejectedResult).reason as UserError
    expect(stopped.message.split('\n')[0]).toBe('The training command for head refit 1 was stopped because the training command for base refit 0 failed.')
    expect(readdirSync(temporaryRoot)).toEqual([])
  })
})
