import { describe, expect, it } from 'vitest'
import { parseDocument, isMap, type YAMLMap } from 'yaml'
import { parsePolicy, readPolicyFile, checkPolicyAgainstColumns } from '../../../src/core/policy/parse-policy.ts'
import { listPolicyKeys } from '../../../src/core/policy/describe-policy-key.ts'
import { formatKeyPath } from '../../../src/core/policy/format-key-path.ts'
import { UserError } from '../../../src/core/errors.ts'
import { defaultBoosting, defaultChecks, defaultImportance, defaultReport } from '../../../src/core/policy/policy-defaults.ts'

const source = 'plumbline.yml'

/** The small policy of docs/policy.md ("A small policy") in this repository, verbatim. */
const minimal = `version: 1
task: binary
target: late
seed: 7
data:
  train: data/train.csv
  holdout: data/holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
`

function failure(text: string): { message: string; fix: string | undefined } {
  try {
    parsePolicy(text, { source })
  } catch (error) {
    if (error instanceof UserError) return { message: error.message, fix: error.fix }
    throw error
  }
  throw new Error('parsePolicy accepted the policy')
}

function columnFailure(text: string, columns: readonly string[]): { message: string; fix: string | undefined } {
  const policy = readPolicyFile(text, { source })
  try {
    checkPolicyAgainstColumns(policy, columns)
  } catch (error) {
    if (error instanceof UserError) return { message: error.message, fix: error.fix }
    throw error
  }
  throw new Error('checkPolicyAgainstColumns accepted the policy')
}

describe('parsePolicy(text, {source})', () => {
  it('resolves the minimal policy of the spec to the documented defaults', () => {
    // test/core/config.test.ts pins each named default to the documented default in docs/policy.md.
    const { checksAsWritten, ...resolved } = parsePolicy(minimal, { source })
    // The report's settings table reads the checks under the policy's own key names, defaults filled in.
    expect(checksAsWritten.rank_shift).toEqual({ action: 'warn', false_discovery_rate: 0.05, min_positions: 2, agreement_percentile: 5 })
    expect(checksAsWritten.score).toEqual({ action: 'block', tolerance: 0, alpha: 0.05 })
    expect(resolved).toEqual({
      version: 1,
      task: 'binary',
      target: 'late',
      seed: 7,
      data: {
        train: 'data/train.csv',
        holdout: { kind: 'file', path: 'data/holdout.csv' },
        reference: { kind: 'train' },
        columns: { parcel_id: 'id' },
        maxTrainRows: 100_000,
        maxHoldoutRows: 50_000,
      },
      model: { kind: 'builtin', learner: 'gradient-boosting', ...defaultBoosting },
      importance: { metric: 'log-loss', ...defaultImportance, groups: {} },
      checks: defaultChecks,
      slices: [],
      report: defaultReport,
    })
  })

  it('defaults the seed to 1 and the metric to rmse for regression (spec)', () => {
    const config = parsePolicy(minimal.replace('seed: 7\n', '').replace('task: binary', 'task: regression'), { source })
    expect(config.seed).toBe(1)
    expect(config.importance.metric).toBe('rmse')
  })

  it('returns a frozen config whose column roles are safe to look up by any name', () => {
    const config = parsePolicy(minimal, { source })
    expect(Object.isFrozen(config)).toBe(true)
    expect(Object.isFrozen(config.checks.leakage)).toBe(true)
    expect(config.data.columns['constructor']).toBeUndefined()
    expect(config.data.columns['toString']).toBeUndefined()
  })

  it('reads values exactly as written, whatever YAML 1.1 would make of them', () => {
    const config = parsePolicy(
      `%YAML 1.1\n---\n${minimal.replace('target: late', 'target: 2019').replace('parcel_id: id', 'no: categorical')}checks:\n  leakage: {action: off}\n`,
      { source },
    )
    expect(config.target).toBe('2019')
    expect(config.data.columns).toEqual({ no: 'categorical' })
    expect(config.checks.leakage.action).toBe('off')
  })

  it('treats an empty section as one with every default', () => {
    const config = parsePolicy(`${minimal}importance:\nchecks:\n  leakage:\nreport:\n`, { source })
    expect(config.importance.draws).toBe(5)
    expect(config.checks.leakage.action).toBe('block')
    expect(config.report.maxTableRows).toBe(50)
  })

  describe('the full policy', () => {
    const fullWithHoldoutAndBuiltin = `version: 1
task: binary
target: late
seed: 4294967295
data:
  train: data/train.csv
  holdout: data/holdout.csv
  reference: holdout
  unlabeled: data/unlabeled.csv
  max_train_rows: 20
  max_holdout_rows: 10
  columns:
    parcel_id: id
    depot: categorical
    distance_km: numeric
    stop_count: numeric
    driver_note: ignore
prepare:
  command: python scripts/features.py
  timeout_seconds: 86400
model:
  builtin:
    learner: gradient-boosting
    trees: 5000
    max_depth: 16
    learning_rate: 1
    min_rows_per_leaf: 1
    l2: 0
    row_subsample: 0.5
    column_subsample: 0.25
    max_bins: 2
importance:
  metric: auc
  draws: 1000
  refits: 100
  reference_rows: 500
  evaluation_rows: 700
  drop_column_top: 2
  groups:
    route: [distance_km, stop_count]
  group_threshold: 0.8
checks:
  leakage:
    action: warn
    dominance_share: 0.6
    runner_up_ratio: 4
    single_feature_power: 0.95
    relative_power: 0.7
    lift_warn: 0.2
    lift_block: 0.4
    slice_warn_power: 0.8
    reviewed_columns: [distance_km]
  rank_shift:
    action: block
    false_discovery_rate: 0.1
    min_positions: 3
    agreement_percentile: 2.5
  score:
    action: off
    tolerance: 0.002
    alpha: 0.01
  holdout_rows:
    action: warn
  correlated_groups:
    action: warn
  sensitivity:
    action: block
    false_discovery_rate: 0.1
    min_relative_change: 0.3
    unlabeled_ratio: 3
    min_share: 0.01
  gain:
    action: off
    top_ranks: 5
    min_gain_share: 0.2
    min_distinct: 50
  slices:
    action: off
    min_rows: 50
slices:
  - name: harbour
    where: { column: depot, equals: harbour }
report:
  max_table_rows: 1000
`
    const withSplitAndOnnx = `version: 1
task: binary
target: late
data:
  train: data/train.csv
  split:
    fraction: 0.25
    by: parcel_id
  reference: data/reference.csv
  columns:
    parcel_id: id
model:
  onnx:
    path: models/*.onnx
    features: [distance_km, stop_count, depot]
    positive_class: late
`
    const withTrain = `version: 1
task: regression
target: minutes_late
data:
  train: data/train.csv
  holdout: data/holdout.csv
model:
  train:
    command: python train.py
    timeout_seconds: 3600
    parallel: 64
`

    it('accepts every key of the policy with a valid value', () => {
      const { checksAsWritten, ...full } = parsePolicy(fullWithHoldoutAndBuiltin, { source })
      expect(Object.keys(checksAsWritten).sort()).toEqual(['correlated_groups', 'gain', 'holdout_rows', 'leakage', 'rank_shift', 'score', 'sensitivity', 'slices'])
      expect(full).toEqual({
        version: 1,
        task: 'binary',
        target: 'late',
        seed: 4294967295,
        data: {
          train: 'data/train.csv',
          holdout: { kind: 'file', path: 'data/holdout.csv' },
          reference: { kind: 'holdout' },
          unlabeled: 'data/unlabeled.csv',
          columns: { parcel_id: 'id', depot: 'categorical', distance_km: 'numeric', stop_count: 'numeric', driver_note: 'ignore' },
          maxTrainRows: 20,
          maxHoldoutRows: 10,
        },
        prepare: { command: 'python scripts/features.py', timeoutSeconds: 86400 },
        model: {
          kind: 'builtin',
          learner: 'gradient-boosting',
          trees: 5000,
          maxDepth: 16,
          learningRate: 1,
          minRowsPerLeaf: 1,
          l2: 0,
          rowSubsample: 0.5,
          columnSubsample: 0.25,
          maxBins: 2,
        },
        importance: { metric: 'auc', draws: 1000, refits: 100, referenceRows: 500, evaluationRows: 700, dropColumnTop: 2, groups: { route: ['distance_km', 'stop_count'] }, groupThreshold: 0.8 },
        checks: {
          leakage: { action: 'warn', dominanceShare: 0.6, runnerUpRatio: 4, singleFeaturePower: 0.95, relativePower: 0.7, liftWarn: 0.2, liftBlock: 0.4, sliceWarnPower: 0.8, reviewedColumns: ['distance_km'] },
          rankShift: { action: 'block', falseDiscoveryRate: 0.1, minPositions: 3, agreementPercentile: 2.5 },
          score: { action: 'off', tolerance: 0.002, alpha: 0.01 },
          holdoutRows: { action: 'warn' },
          sensitivity: { action: 'block', falseDiscoveryRate: 0.1, minRelativeChange: 0.3, unlabeledRatio: 3, minShare: 0.01 },
          gain: { action: 'off', topRanks: 5, minGainShare: 0.2, minDistinct: 50 },
          slices: { action: 'off', minRows: 50 },
          correlatedGroups: { action: 'warn' },
        },
        slices: [{ name: 'harbour', where: { column: 'depot', equals: 'harbour' } }],
        report: { maxTableRows: 1000 },
      })
      const split = parsePolicy(withSplitAndOnnx, { source })
      expect(split.data.holdout).toEqual({ kind: 'split', fraction: 0.25, by: 'parcel_id' })
      expect(split.data.reference).toEqual({ kind: 'file', path: 'data/reference.csv' })
      expect(split.model).toEqual({ kind: 'onnx', path: 'models/*.onnx', features: ['distance_km', 'stop_count', 'depot'], positiveClass: 'late' })
      const train = parsePolicy(withTrain, { source })
      expect(train.model).toEqual({ kind: 'train', command: 'python train.py', timeoutSeconds: 3600, parallel: 64 })
      expect(train.importance.metric).toBe('rmse')
    })

    it('between them writes every key the schema knows', () => {
      const written = new Set<string>()
      const collect = (node: unknown, path: string[]) => {
        if (!isMap(node)) return
        for (const pair of (node as YAMLMap).items) {
          const key = String((pair.key as { value: unknown }).value)
          written.add(formatKeyPath([...path, key]))
          // data.columns and importance.groups have names the user chooses; stop there.
          if (!['columns', 'groups'].includes(key)) collect(pair.value, [...path, key])
        }
      }
      for (const text of [fullWithHoldoutAndBuiltin, withSplitAndOnnx, withTrain]) collect(parseDocument(text).contents, [])
      const schemaKeys = listPolicyKeys().map(formatKeyPath)
      expect(schemaKeys.filter((key) => !written.has(key))).toEqual([])
      expect([...written].filter((key) => !schemaKeys.includes(key))).toEqual([])
    })

    it('reads a positive class written as digits as a number, and other text as a label', () => {
      const onnx = (value: string) => minimal.replace('  builtin:\n    learner: gradient-boosting\n', `  onnx:\n    path: m.onnx\n    positive_class: ${value}\n`)
      expect(parsePolicy(onnx('1'), { source }).model).toEqual({ kind: 'onnx', path: 'm.onnx', positiveClass: 1 })
      expect(parsePolicy(onnx('late'), { source }).model).toEqual({ kind: 'onnx', path: 'm.onnx', positiveClass: 'late' })
    })

    it('takes the linear learner with its penalty', () => {
      const config = parsePolicy(minimal.replace('learner: gradient-boosting', 'learner: linear\n    l2: 0.5'), { source })
      expect(config.model).toMatchObject({ kind: 'builtin', learner: 'linear', l2: 0.5 })
    })
  })

  describe('refuses', () => {
    it('an action that is not block, warn or off', () => {
      const text = `version: 1
task: binary
target: late
data:
  train: data/train.csv
  holdout: data/holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
checks:
  leakage:
    action: blok
`
      expect(failure(text)).toEqual({
        message: "plumbline.yml:14:13: checks.leakage.action must be one of block, warn, off; got 'blok'.",
        fix: 'Set checks.leakage.action to one of block, warn, off, or delete the line to use the default (block).',
      })
    })

    it('a row cap below the gate\'s minimum, naming the key', () => {
      const capped = minimal.replace('  holdout: data/holdout.csv\n', '  holdout: data/holdout.csv\n  max_train_rows: 5\n  max_holdout_rows: 2.5\n')
      expect(failure(capped)).toEqual({
        message: "plumbline.yml:8:19: data.max_train_rows must be a whole number of at least 20; got '5'.",
        fix: 'Set data.max_train_rows to a whole number of at least 20, or delete the line to use the default (100000).',
      })
      expect(failure(capped.replace('max_train_rows: 5', 'max_train_rows: 100')).message).toBe(
        "plumbline.yml:9:21: data.max_holdout_rows must be a whole number of at least 10; got '2.5'.",
      )
    })

    it('slice filters that are not one column comparison, or all_of / any_of, naming the slice and key', () => {
      const withSlices = (slices: string) => `${minimal}slices:\n${slices}`
      expect(failure(withSlices('  - name: harbour\n    where: { column: depot, equals: harbour, below: 3 }\n'))).toEqual({
        message:
          'plumbline.yml:15:5: slices[0].where has 2 comparisons (equals, below); a filter is column with one of equals, in, at_least, below, between, is_missing; or all_of or any_of with a list of filters.',
        fix: 'Keep one comparison here and put the others in their own filters under all_of.',
      })
      expect(failure(withSlices('  - name: long\n    where: { all_of: [ { column: km, between: [5, 2] } ] }\n'))).toEqual({
        message: 'plumbline.yml:15:47: slices[0].where.all_of[0].between needs low below high; got [5, 2].',
        fix: 'Write between: [low, high] with low < high (low included, high excluded).',
      })
      expect(failure(withSlices('  - name: h\n    where: { colum: d, at_least: 1 }\n')).message).toBe(
        "plumbline.yml:15:14: unknown key 'colum' in slices[0].where (allowed: column, equals, in, at_least, below, between, is_missing, all_of, any_of). Did you mean 'column'?",
      )
      expect(failure(withSlices('  - name: h\n    where: { column: d, at_least: ten }\n')).message).toBe("plumbline.yml:15:35: slices[0].where.at_least must be a number; got 'ten'.")
      expect(failure(withSlices('  - name: h\n    where: { column: d, below: 1 }\n  - name: h\n    where: { column: d, below: 2 }\n')).message).toBe(
        "plumbline.yml:16:11: slices[1].name repeats the slice name 'h'; each slice needs its own name.",
      )
      const config = parsePolicy(withSlices('  - name: wet harbour\n    where:\n      all_of:\n        - { column: depot, in: [harbour] }\n        - { column: rain_mm, is_missing: false }\n'), { source })
      expect(config.slices).toEqual([{ name: 'wet harbour', where: { allOf: [{ column: 'depot', in: ['harbour'] }, { column: 'rain_mm', isMissing: false }] } }])
    })

    it('an unknown key, suggesting the nearest allowed one', () => {
      const text = `version: 1
task: binary
target: late
data:
  train: data/train.csv
  holdout: data/holdout.csv
importance:
  draws: 5
  refts: 3
model:
  builtin:
    learner: gradient-boosting
`
      expect(failure(text)).toEqual({
        message:
          "plumbline.yml:9:3: unknown key 'refts' in importance (allowed: metric, draws, refits, reference_rows, evaluation_rows, drop_column_top, groups, group_threshold). Did you mean 'refits'?",
        fix: "Rename 'refts' to 'refits', or delete it.",
      })
    })

    it('a misspelt action key, so that a typo never leaves a check at its default', () => {
      expect(failure(`${minimal}checks:\n  score:\n    acton: off\n`)).toEqual({
        message: "plumbline.yml:15:5: unknown key 'acton' in checks.score (allowed: action, tolerance, alpha). Did you mean 'action'?",
        fix: "Rename 'acton' to 'action', or delete it.",
      })
    })

    it('a camelCase key, pointing to its snake_case spelling', () => {
      expect(failure(`${minimal}checks:\n  leakage:\n    singleFeaturePower: 0.9\n`).message).toBe(
        "plumbline.yml:15:5: unknown key 'singleFeaturePower' in checks.leakage (allowed: action, dominance_share, runner_up_ratio, single_feature_power, relative_power, lift_warn, lift_block, slice_warn_power, reviewed_columns). Did you mean 'single_feature_power'?",
      )
    })

    it('an unknown key with no near match, without a guess', () => {
      expect(failure(`${minimal}notify: team\n`)).toEqual({
        message:
          "plumbline.yml:13:1: unknown key 'notify' at the top level (allowed: version, task, target, seed, data, prepare, model, importance, checks, slices, report).",
        fix: "Delete 'notify', or rename it to one of the allowed keys (docs/policy.md describes each).",
      })
    })

    it('a policy without a target', () => {
      expect(failure(minimal.replace('target: late\n', ''))).toEqual({
        message: "plumbline.yml: missing required key 'target' at the top level.",
        fix: "Add 'target:' at the top level, set to a column name.",
      })
    })

    it('a misspelt required key as unknown before reporting it missing', () => {
      expect(failure(minimal.replace('target: late', 'targte: late')).message).toBe(
        "plumbline.yml:3:1: unknown key 'targte' at the top level (allowed: version, task, target, seed, data, prepare, model, importance, checks, slices, report). Did you mean 'target'?",
      )
    })

    it('a builtin model without a learner, pointing at the section', () => {
      expect(failure(minimal.replace('    learner: gradient-boosting\n', ''))).toEqual({
        message: "plumbline.yml:11:3: missing required key 'learner' in model.builtin.",
        fix: "Add 'learner:' under model.builtin, set to one of gradient-boosting, linear.",
      })
    })

    it('a policy without a model section', () => {
      expect(failure(minimal.replace(/model:\n.*\n.*\n$/, ''))).toEqual({
        message: "plumbline.yml: missing required key 'model' at the top level.",
        fix: "Add a 'model:' section at the top level, a mapping with one of builtin, onnx, train (docs/policy.md lists its keys).",
      })
    })

    it('a YAML syntax error, with its position', () => {
      expect(failure('version: 1\ntask: [binary\n')).toEqual({
        message: 'plumbline.yml:3:1: not valid YAML: Flow sequence in block collection must be sufficiently indented and end with a ].',
        fix: 'Fix the YAML at that line: nested keys are indented with spaces (no tabs), and a value holding ": " or starting with one of [ ] { } # & * ! | > \' " % @ ` is put in quotes.',
      })
      expect(failure('version: 1\ndata:\n\ttrain: a.csv\n').message).toBe('plumbline.yml:3:1: not valid YAML: Tabs are not allowed as indentation.')
    })

    it('a key written twice, naming both lines', () => {
      expect(failure(minimal.replace('seed: 7\n', 'seed: 7\nseed: 8\n'))).toEqual({
        message: "plumbline.yml:5:1: key 'seed' appears twice at the top level (first at line 4).",
        fix: "Keep one 'seed:' line at the top level and delete the other.",
      })
      expect(failure(`${minimal}checks:\n  score:\n    alpha: 0.1\n    alpha: 0.2\n`).message).toBe(
        "plumbline.yml:16:5: key 'alpha' appears twice in checks.score (first at line 15).",
      )
    })

    it('an empty file, or one holding only comments', () => {
      const expected = {
        message: 'plumbline.yml: the file is empty; a policy needs at least version, task, target, data and model.',
        fix: "Run 'plumbline init' to write a starter policy, or see docs/policy.md.",
      }
      expect(failure('')).toEqual(expected)
      expect(failure('\n  \n')).toEqual(expected)
      expect(failure('# plumbline policy\n# to do\n')).toEqual(expected)
    })

    it('a top level that is not a mapping', () => {
      expect(failure('- version: 1\n- task: binary\n')).toEqual({
        message: "plumbline.yml:1:1: the top level must be a mapping of keys such as 'version: 1'; got a list.",
        fix: "Write one 'key: value' per line, starting with 'version: 1' (docs/policy.md); 'plumbline init' writes a starter policy.",
      })
      expect(failure('just some text\n').message).toBe(
        "plumbline.yml:1:1: the top level must be a mapping of keys such as 'version: 1'; got 'just some text'.",
      )
    })

    it('a version other than 1', () => {
      expect(failure(minimal.replace('version: 1', 'version: 2'))).toEqual({
        message: "plumbline.yml:1:10: version must be 1; got '2'.",
        fix: "Set 'version: 1'; this release of plumbline reads policy version 1 only.",
      })
    })

    it('two model kinds at once', () => {
      expect(failure(`${minimal}  onnx:\n    path: model.onnx\n`)).toEqual({
        message: "plumbline.yml:13:3: model has both 'builtin' and 'onnx'; use one of builtin, onnx, train.",
        fix: "Delete 'builtin:' or 'onnx:' from model.",
      })
    })

    it('a model section naming no kind', () => {
      expect(failure(minimal.replace('  builtin:\n    learner: gradient-boosting\n', ''))).toEqual({
        message: 'plumbline.yml:10:1: model needs one of builtin, onnx, train; got none.',
        fix: "Add 'builtin:' with 'learner: gradient-boosting' under model, or 'onnx:' or 'train:' (docs/policy.md shows each).",
      })
    })

    it('both a holdout file and a split', () => {
      expect(failure(minimal.replace('  holdout: data/holdout.csv\n', '  holdout: data/holdout.csv\n  split:\n    fraction: 0.3\n'))).toEqual({
        message: "plumbline.yml:8:3: data has both 'holdout' and 'split'; use one.",
        fix: "Delete 'split:' to use the holdout file, or delete 'holdout:' to carve the holdout out of data.train.",
      })
    })

    it('neither a holdout file nor a split', () => {
      expect(failure(minimal.replace('  holdout: data/holdout.csv\n', ''))).toEqual({
        message: 'plumbline.yml:5:1: data needs one of holdout, split; got neither.',
        fix: "Add 'holdout: <path>' under data, or 'split:' with 'fraction: 0.2' to carve the holdout out of data.train.",
      })
    })

    it('a group naming the same column twice, at the second mention', () => {
      expect(failure(`${minimal}importance:\n  groups:\n    route: [distance_km, stop_count, distance_km]\n`)).toEqual({
        message: "plumbline.yml:15:38: importance.groups.route lists 'distance_km' twice; a group names each column once.",
        fix: "Delete the second 'distance_km' from importance.groups.route.",
      })
    })

    it('a group holding the target', () => {
      expect(failure(`${minimal}importance:\n  groups:\n    route:\n      - distance_km\n      - late\n`)).toEqual({
        message: "plumbline.yml:17:9: importance.groups.route lists 'late', which is the target; the target cannot be a feature.",
        fix: "Remove 'late' from importance.groups.route.",
      })
    })

    it('a group holding a column declared id', () => {
      expect(failure(`${minimal}importance:\n  groups:\n    route: [parcel_id]\n`).message).toBe(
        "plumbline.yml:15:13: importance.groups.route lists 'parcel_id', which data.columns marks as id; only features can be listed here.",
      )
    })

    it('a role declared for the target column', () => {
      expect(failure(minimal.replace('    parcel_id: id\n', '    parcel_id: id\n    late: categorical\n'))).toEqual({
        message: "plumbline.yml:10:5: data.columns.late gives a role to the target column 'late'; the target is named by 'target:' alone.",
        fix: "Delete the line 'late: categorical' from data.columns.",
      })
    })

    it('a split by the target column', () => {
      expect(failure(minimal.replace('  holdout: data/holdout.csv\n', '  split:\n    by: late\n')).message).toBe(
        "plumbline.yml:8:5: data.split.by names the target column 'late'; split by an id column instead.",
      )
    })

    it('a whole-number setting out of its range, or not a number', () => {
      expect(failure(`${minimal}importance:\n  draws: 0\n`)).toEqual({
        message: "plumbline.yml:14:10: importance.draws must be a whole number from 1 to 1000; got '0'.",
        fix: 'Set importance.draws to a whole number from 1 to 1000, or delete the line to use the default (5).',
      })
      expect(failure(`${minimal}importance:\n  refits: 2.5\n`).message).toBe(
        "plumbline.yml:14:11: importance.refits must be a whole number from 1 to 100; got '2.5'.",
      )
      expect(failure(minimal.replace('seed: 7', 'seed: 0x10')).message).toBe(
        "plumbline.yml:4:7: seed must be a whole number from 0 to 4294967295; got '0x10'.",
      )
      expect(failure(minimal.replace('seed: 7', 'seed: 4294967296')).message).toBe(
        "plumbline.yml:4:7: seed must be a whole number from 0 to 4294967295; got '4294967296'.",
      )
    })

    it('a fraction on the wrong side of an open bound', () => {
      expect(failure(minimal.replace('  holdout: data/holdout.csv\n', '  split:\n    fraction: 1\n'))).toEqual({
        message: "plumbline.yml:8:15: data.split.fraction must be a number above 0 and below 1; got '1'.",
        fix: 'Set data.split.fraction to a number above 0 and below 1, or delete the line to use the default (0.2).',
      })
      expect(failure(`${minimal}checks:\n  leakage:\n    dominance_share: 1.5\n`).message).toBe(
        "plumbline.yml:15:22: checks.leakage.dominance_share must be a number above 0 and at most 1; got '1.5'.",
      )
    })

    it('an empty value where a setting is needed', () => {
      expect(failure(`${minimal}checks:\n  score:\n    alpha:\n`).message).toBe(
        'plumbline.yml:15:11: checks.score.alpha must be a number above 0 and below 1; got an empty value.',
      )
    })

    it('a value where a section is expected', () => {
      expect(failure(`${minimal}checks:\n  leakage: block\n`)).toEqual({
        message: "plumbline.yml:14:12: checks.leakage must be a mapping of keys; got 'block'.",
        fix: "Write checks.leakage as a mapping of keys, one 'key: value' per line indented below it (docs/policy.md).",
      })
    })

    it('a group that is not a list of columns', () => {
      expect(failure(`${minimal}importance:\n  groups:\n    route: distance_km\n`).message).toBe(
        "plumbline.yml:15:12: importance.groups.route must be a list of column names, such as [distance_km, stop_count]; got 'distance_km'.",
      )
      expect(failure(`${minimal}importance:\n  groups:\n    route: []\n`).message).toBe(
        'plumbline.yml:15:12: importance.groups.route must be a list of column names, such as [distance_km, stop_count]; got an empty list.',
      )
    })

    it('a column role outside numeric, categorical, id, ignore', () => {
      expect(failure(minimal.replace('parcel_id: id', "'parcel id': identifier"))).toEqual({
        message: "plumbline.yml:9:18: data.columns['parcel id'] must be one of numeric, categorical, id, ignore; got 'identifier'.",
        fix: "Set data.columns['parcel id'] to one of numeric, categorical, id, ignore.",
      })
    })

    it('a metric of the other task', () => {
      expect(failure(`${minimal}importance:\n  metric: rmse\n`)).toEqual({
        message: "plumbline.yml:14:11: importance.metric must be one of auc, log-loss, accuracy, brier for task binary; got 'rmse'.",
        fix: 'Set importance.metric to one of auc, log-loss, accuracy, brier, or delete the line to use the default for task binary (log-loss).',
      })
    })

    it('gradient-boosting settings under the linear learner', () => {
      expect(failure(minimal.replace('learner: gradient-boosting', 'learner: linear\n    max_depth: 3'))).toEqual({
        message: 'plumbline.yml:13:5: model.builtin.max_depth applies to learner gradient-boosting only; learner is linear.',
        fix: "Delete 'max_depth:' from model.builtin, or set 'learner: gradient-boosting'.",
      })
    })

    it('a positive class for a regression task', () => {
      const text = minimal.replace('task: binary', 'task: regression').replace('  builtin:\n    learner: gradient-boosting\n', '  onnx:\n    path: m.onnx\n    positive_class: late\n')
      expect(failure(text).message).toBe('plumbline.yml:13:5: model.onnx.positive_class applies to task binary only; task is regression.')
    })

    it('ONNX features that repeat a column', () => {
      const text = minimal.replace('  builtin:\n    learner: gradient-boosting\n', '  onnx:\n    path: m.onnx\n    features: [a, b, a]\n')
      expect(failure(text).message).toBe("plumbline.yml:13:22: model.onnx.features lists 'a' twice; the list names each column once.")
    })

    it('an alias that refers to itself', () => {
      expect(failure(`${minimal}extra: &loop\n  again: *loop\n`).message).toBe('plumbline.yml:14:10: the alias *loop refers to itself or to nothing.')
    })

    it('with the same line and column for Windows line endings', () => {
      expect(failure(`${minimal}checks:\n  score:\n    alpha: 2\n`.replaceAll('\n', '\r\n')).message).toBe(
        "plumbline.yml:15:12: checks.score.alpha must be a number above 0 and below 1; got '2'.",
      )
    })

    it('reports the first problem in the file when there are several', () => {
      const text = minimal.replace('seed: 7', 'seed: -1') + 'checks:\n  leakage:\n    action: maybe\n'
      expect(failure(text).message).toBe("plumbline.yml:4:7: seed must be a whole number from 0 to 4294967295; got '-1'.")
    })
  })
})

describe('checkPolicyAgainstColumns(policy, columns)', () => {
  const columns = ['parcel_id', 'depot', 'distance_km', 'stop_count']

  it('accepts a policy whose names are all columns of the data', () => {
    const policy = readPolicyFile(`${minimal}importance:\n  groups:\n    route: [distance_km, stop_count]\n`, { source })
    expect(() => checkPolicyAgainstColumns(policy, columns)).not.toThrow()
  })

  it('accepts a column one side lacks (that side removed or added it), but not an id one side lacks', () => {
    const text = minimal.replace('    parcel_id: id\n', '    parcel_id: id\n    van_age_years: numeric\n')
    const policy = readPolicyFile(text, { source })
    expect(() => checkPolicyAgainstColumns(policy, columns, { otherSide: [...columns, 'van_age_years'] })).not.toThrow()
    expect(() => checkPolicyAgainstColumns(policy, columns, { otherSide: columns })).toThrow(/van_age_years/)
    const withoutId = columns.filter((c) => c !== 'parcel_id')
    expect(() => checkPolicyAgainstColumns(readPolicyFile(minimal, { source }), withoutId, { otherSide: columns })).toThrow(/parcel_id/)
  })

  it('names the group, the position of the member, the columns and a close name', () => {
    const text = `${minimal}importance:\n  groups:\n    route: [distance_km, stops_count]\n`
    expect(columnFailure(text, columns)).toEqual({
      message:
        "plumbline.yml:15:26: importance.groups.route lists 'stops_count', which is not a column of the data (columns: parcel_id, depot, distance_km, stop_count). Did you mean 'stop_count'?",
      fix: "Correct or remove 'stops_count' in importance.groups.route.",
    })
  })

  it('checks declared roles other than ignore', () => {
    const text = minimal.replace('    parcel_id: id\n', '    parcel_id: id\n    old_column: ignore\n    weather: categorical\n')
    expect(columnFailure(text, columns)).toEqual({
      message: "plumbline.yml:11:5: data.columns gives a role to 'weather', which is not a column of the data (columns: parcel_id, depot, distance_km, stop_count).",
      fix: "Correct 'weather' in data.columns, or delete its line if the data no longer has the column.",
    })
  })

  it('checks the split column and the ONNX feature list', () => {
    const split = minimal.replace('  holdout: data/holdout.csv\n', '  split:\n    by: parcel\n')
    expect(columnFailure(split, columns).message).toBe(
      "plumbline.yml:8:9: data.split.by names 'parcel', which is not a column of the data (columns: parcel_id, depot, distance_km, stop_count).",
    )
    const onnx = minimal.replace('  builtin:\n    learner: gradient-boosting\n', '  onnx:\n    path: m.onnx\n    features: [depot, distance]\n')
    expect(columnFailure(onnx, columns).message).toBe(
      "plumbline.yml:13:23: model.onnx.features lists 'distance', which is not a column of the data (columns: parcel_id, depot, distance_km, stop_count).",
    )
  })

  it('refuses a group named like a column', () => {
    expect(columnFailure(`${minimal}importance:\n  groups:\n    depot: [distance_km, stop_count]\n`, columns)).toEqual({
      message: "plumbline.yml:15:5: importance.groups.depot has the name of a column of the data; the report would show two rows called 'depot'.",
      fix: "Rename the group, for example to 'depot_group'.",
    })
  })

  it('lists at most 20 columns', () => {
    const many = ['parcel_id', ...Array.from({ length: 24 }, (_, i) => `c${i + 1}`)]
    expect(columnFailure(`${minimal}importance:\n  groups:\n    g: [zzz]\n`, many).message).toBe(
      "plumbline.yml:15:9: importance.groups.g lists 'zzz', which is not a column of the data (columns: parcel_id, c1, c2, c3, c4, c5, c6, c7, c8, c9, c10, c11, c12, c13, c14, c15, c16, c17, c18, c19 and 5 more).",
    )
  })

  it('names the file alone when it has no positions for the key', () => {
    const policy = { ...readPolicyFile(`${minimal}importance:\n  groups:\n    g: [zzz]\n`, { source }), positions: new Map() }
    expect(() => checkPolicyAgainstColumns(policy, columns)).toThrow(
      "plumbline.yml: importance.groups.g lists 'zzz', which is not a column of the data (columns: parcel_id, depot, distance_km, stop_count).",
    )
  })
})

describe('task: multiclass', () => {
  const multiclass = minimal.replace('task: binary', 'task: multiclass')

  it('is accepted, with log-loss as the default metric', () => {
    const config = parsePolicy(multiclass, { source })
    expect(config.task).toBe('multiclass')
    expect(config.importance.metric).toBe('log-loss')
    expect(parsePolicy(`${multiclass}importance:\n  metric: auc\n`, { source }).importance.metric).toBe('auc')
  })

  it('refuses a metric of another task and the linear learner, with the fix', () => {
    expect(failure(`${multiclass}importance:\n  metric: brier\n`)).toEqual({
      message: "plumbline.yml:14:11: importance.metric must be one of log-loss, accuracy, auc for task multiclass; got 'brier'.",
      fix: 'Set importance.metric to one of log-loss, accuracy, auc, or delete the line to use the default for task multiclass (log-loss).',
    })
    expect(failure(multiclass.replace('learner: gradient-boosting', 'learner: linear'))).toEqual({
      message: 'plumbline.yml:12:5: model.builtin.learner is linear, which has no multiclass fit in plumbline; task is multiclass.',
      fix: "Set 'learner: gradient-boosting' (softmax boosting, one tree per class per round), or gate a model of your own through model.onnx or model.train.",
    })
  })
})
