import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { parse } from 'yaml'
import { UserError } from '../../../src/core/errors.ts'
import { inputDefaults, isFailingVerdict, readInputs } from '../../../src/adapters/action/inputs.ts'

const actionYml = parse(readFileSync(new URL('../../../action.yml', import.meta.url), 'utf8')) as {
  inputs: Record<string, { default?: string }>
}

/** The runner's behaviour: every input declared in action.yml arrives, with its default unless set. */
function runnerInputs(set: Record<string, string> = {}) {
  const values: Record<string, string> = {}
  for (const [name, input] of Object.entries(actionYml.inputs)) values[name] = input.default ?? ''
  values.token = 'ghs_exampletoken'
  Object.assign(values, set)
  return (name: string) => {
    if (!(name in actionYml.inputs)) throw new Error(`readInputs asked for '${name}', which action.yml does not declare`)
    return values[name] ?? ''
  }
}

function failure(set: Record<string, string>): UserError {
  try {
    readInputs(runnerInputs(set))
  } catch (error) {
    if (error instanceof UserError) return error
    throw error
  }
  throw new Error('readInputs accepted the inputs')
}

describe('readInputs(getInput)', () => {
  it('reads the defaults action.yml declares', () => {
    expect(readInputs(runnerInputs())).toEqual({
      policyPath: 'plumbline.yml',
      token: 'ghs_exampletoken',
      baseRef: null,
      headRef: null,
      isCommentWanted: true,
      failOn: 'block',
      mode: 'check',
      reportPath: null,
      isForkCodeAllowed: false,
      workingDirectory: '.',
      htmlArtifact: 'plumbline-report',
      isCacheWanted: false,
      shards: null,
      shard: null,
      partialDirectory: 'plumbline-partial',
      after: [],
      partials: [],
    })
  })

  it("reads 'html-report' as an artifact name, empty as no upload, and refuses a name GitHub would refuse", () => {
    expect(readInputs(runnerInputs({ 'html-report': '' })).htmlArtifact).toBeNull()
    expect(readInputs(runnerInputs({ 'html-report': 'gate report 7' })).htmlArtifact).toBe('gate report 7')
    expect(() => readInputs(runnerInputs({ 'html-report': 'reports/gate' }))).toThrow(
      new UserError(
        'Input \'html-report\' must be an artifact name without " : < > | * ? \\ / or line breaks, at most 200 characters; got "reports/gate".',
        "Fix 'html-report:' in the workflow step, or delete the line to use the default from action.yml. Set it empty to upload no HTML report.",
      ),
    )
  })

  it('uses the same default as action.yml for an input that arrives empty', () => {
    for (const [name, value] of Object.entries(inputDefaults)) expect(actionYml.inputs[name].default).toBe(value)
    const empty = Object.fromEntries(Object.keys(inputDefaults).map((name) => [name, '']))
    expect(readInputs(runnerInputs(empty))).toEqual(readInputs(runnerInputs()))
  })

  it('reads every input as set in the workflow', () => {
    const inputs = readInputs(
      runnerInputs({
        policy: 'ml/plumbline.yml',
        base: 'origin/main',
        head: 'HEAD~1',
        comment: 'False',
        'fail-on': 'warn',
        mode: 'publish',
        report: 'artifacts/report.json',
        'allow-fork-code': 'TRUE',
        'working-directory': 'repo',
      }),
    )
    expect(inputs).toMatchObject({
      policyPath: 'ml/plumbline.yml',
      baseRef: 'origin/main',
      headRef: 'HEAD~1',
      isCommentWanted: false,
      failOn: 'warn',
      mode: 'publish',
      reportPath: 'artifacts/report.json',
      isForkCodeAllowed: true,
      workingDirectory: 'repo',
    })
  })

  it("names 'fail-on' as typed and lists its choices", () => {
    const error = failure({ 'fail-on': 'blocker' })
    expect(error.message).toBe("Input 'fail-on' must be one of block, warn, never; got 'blocker'.")
    expect(error.fix).toBe("Fix 'fail-on:' in the workflow step, or delete the line to use the default from action.yml.")
  })

  it('refuses booleans outside the YAML 1.2 core schema', () => {
    expect(failure({ comment: 'yes' }).message).toBe("Input 'comment' must be true or false; got 'yes'.")
    expect(failure({ 'allow-fork-code': '1' }).message).toBe("Input 'allow-fork-code' must be true or false; got '1'.")
    expect(failure({ 'allow-fork-code': '1' }).fix).toBe(
      "Fix 'allow-fork-code:' in the workflow step, or delete the line to use the default from action.yml.",
    )
  })

  it("refuses an unknown 'mode'", () => {
    expect(failure({ mode: 'post' }).message).toBe("Input 'mode' must be one of check, publish, plan, shard, merge; got 'post'.")
  })

  it('reads the plan, shard and merge inputs: shards, shard, after, partial-dir, partials, cache', () => {
    expect(readInputs(runnerInputs({ mode: 'plan', shards: '4' }))).toMatchObject({ mode: 'plan', shards: 4, shard: null })
    expect(
      readInputs(runnerInputs({ mode: 'shard', shards: '4', shard: '3', after: 'refits/a\n\n  refits/b  \n', 'partial-dir': 'out/drops', cache: 'true' })),
    ).toMatchObject({ mode: 'shard', shards: 4, shard: 3, after: ['refits/a', 'refits/b'], partialDirectory: 'out/drops', isCacheWanted: true })
    expect(readInputs(runnerInputs({ mode: 'merge', partials: 'partials' }))).toMatchObject({ mode: 'merge', partials: ['partials'], shards: null })
    expect(readInputs(runnerInputs({ cache: 'true' })).isCacheWanted).toBe(true)
  })

  it('refuses a missing or bad shard count or index, naming the input and the range', () => {
    expect(failure({ mode: 'plan' }).message).toBe("Input 'shards' is required when 'mode' is plan: how many shards the work is split into.")
    expect(failure({ mode: 'shard', shards: '2' }).message).toBe("Input 'shard' is required when 'mode' is shard: which shard this job runs, 1 to 2.")
    const outside = failure({ mode: 'shard', shards: '2', shard: '3' })
    expect(outside.message).toBe("Input 'shard' must be a whole number from 1 to 2; got '3'.")
    expect(outside.fix).toBe("Set 'shard:' to a value of the plan's matrix (1 to 2, the 'shards' input), normally '${{ matrix.shard }}'.")
    expect(failure({ mode: 'shard', shards: '2', shard: '0' }).message).toBe("Input 'shard' must be a whole number from 1 to 2; got '0'.")
    expect(failure({ mode: 'plan', shards: '2.5' }).message).toBe("Input 'shards' must be a whole number from 1 to 1000; got '2.5'.")
    expect(failure({ mode: 'plan', shards: '1001' }).message).toBe("Input 'shards' must be a whole number from 1 to 1000; got '1001'.")
  })

  it("needs 'partials' in merge mode, and refuses an input the mode does not read", () => {
    const error = failure({ mode: 'merge' })
    expect(error.message).toBe("Input 'partials' is required when 'mode' is merge: the folders of every shard's partial results, one per line.")
    expect(failure({ mode: 'check', shards: '2' }).message).toBe("Input 'shards' is read only when 'mode' is plan or shard; this step's mode is check.")
    expect(failure({ mode: 'plan', shards: '2', shard: '1' }).message).toBe("Input 'shard' is read only when 'mode' is shard; this step's mode is plan.")
    expect(failure({ mode: 'merge', partials: 'p', after: 'refits' }).message).toBe("Input 'after' is read only when 'mode' is shard; this step's mode is merge.")
    expect(failure({ partials: 'p' }).message).toBe("Input 'partials' is read only when 'mode' is merge; this step's mode is check.")
    const cache = failure({ mode: 'merge', partials: 'p', cache: 'true' })
    expect(cache.message).toBe("Input 'cache' is read only when 'mode' is check or shard; this step's mode is merge.")
    expect(cache.fix).toBe("Delete 'cache:' from the step, or set 'mode:' to check or shard.")
  })

  it("needs 'report' in publish mode", () => {
    const error = failure({ mode: 'publish' })
    expect(error.message).toBe("Input 'report' is required when 'mode' is publish: it is the path of the JSON report to post.")
    expect(error.fix).toBe(
      "Set 'report:' to where the download step put the report the pull_request job uploaded (see docs/action.md).",
    )
  })

  it('refuses a ref git would read as an option, or one with spaces', () => {
    const error = failure({ base: '--upload-pack=touch /tmp/x' })
    expect(error.message).toBe("Input 'base' must be a commit SHA or a git ref such as main or origin/main; got '--upload-pack=touch /tmp/x'.")
    expect(error.fix).toBe("Fix 'base:' in the workflow step, or delete the line to take it from the event.")
    expect(failure({ head: 'main feature' }).message).toBe(
      "Input 'head' must be a commit SHA or a git ref such as main or origin/main; got 'main feature'.",
    )
  })

  it('refuses a path of several lines', () => {
    expect(failure({ policy: 'a.yml\nb.yml' }).message).toBe('Input \'policy\' must be a single path; got "a.yml\\nb.yml".')
  })
})

describe('isFailingVerdict(verdict, failOn)', () => {
  it('fails at or above the level, and always on error', () => {
    const table = (['pass', 'warn', 'block', 'error'] as const).map((verdict) =>
      (['block', 'warn', 'never'] as const).map((failOn) => isFailingVerdict(verdict, failOn)),
    )
    expect(table).toEqual([
      [false, false, false],
      [false, true, false],
      [true, true, false],
      [true, true, true],
    ])
  })
})
