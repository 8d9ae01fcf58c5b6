import { describe, expect, it } from 'vitest'
import {
  defaultBoosting,
  defaultChecks,
  defaultData,
  defaultImportance,
  defaultMetric,
  defaultPrepare,
  defaultReport,
  defaultTopLevel,
  defaultTrainCommand,
  metricTasks,
  metricsOfTask,
} from '../../src/core/policy/policy-defaults.ts'
import { boostingOnlyKeys, policySchema } from '../../src/core/policy/policy-schema.ts'
import { describePolicyKey } from '../../src/core/policy/describe-policy-key.ts'

describe('the named defaults', () => {
  it('are the values of the policy spec', () => {
    // Every literal below is the documented default in docs/policy.md of this repository.
    expect(defaultTopLevel).toEqual({ seed: 1 })
    expect(defaultData).toEqual({ reference: { kind: 'train' }, split: { fraction: 0.2 }, maxTrainRows: 100_000, maxHoldoutRows: 50_000 })
    expect(defaultPrepare).toEqual({ timeoutSeconds: 600 })
    expect(defaultBoosting).toEqual({
      trees: 200,
      maxDepth: 4,
      learningRate: 0.1,
      minRowsPerLeaf: 20,
      l2: 1.0,
      rowSubsample: 0.8,
      columnSubsample: 0.8,
      maxBins: 255,
    })
    expect(defaultTrainCommand).toEqual({ timeoutSeconds: 1800, parallel: 2 })
    expect(defaultImportance).toEqual({ draws: 5, refits: 5, referenceRows: 10000, evaluationRows: 20000, dropColumnTop: 1, groupThreshold: 0.9 })
    expect(defaultMetric).toEqual({ binary: 'log-loss', regression: 'rmse', multiclass: 'log-loss' })
    expect(defaultChecks).toEqual({
      leakage: { action: 'block', dominanceShare: 0.5, runnerUpRatio: 3, singleFeaturePower: 0.99, relativePower: 0.8, liftWarn: 0.15, liftBlock: 0.25, sliceWarnPower: 0.9, reviewedColumns: [] },
      rankShift: { action: 'warn', falseDiscoveryRate: 0.05, minPositions: 2, agreementPercentile: 5 },
      score: { action: 'block', tolerance: 0.0, alpha: 0.05 },
      holdoutRows: { action: 'block' },
      sensitivity: { action: 'warn', falseDiscoveryRate: 0.05, minRelativeChange: 0.2, unlabeledRatio: 2, minShare: 0.05 },
      gain: { action: 'warn', topRanks: 3, minGainShare: 0.1, minDistinct: 10 },
      slices: { action: 'warn', minRows: 200 },
      correlatedGroups: { action: 'info' },
    })
    expect(defaultReport).toEqual({ maxTableRows: 50 })
  })

  it('cannot be changed by the code that reads them', () => {
    expect(Object.isFrozen(defaultChecks.leakage)).toBe(true)
    expect(() => {
      ;(defaultBoosting as { trees: number }).trees = 1
    }).toThrow(TypeError)
  })

  it('give each task a default metric of that task', () => {
    expect(metricTasks[defaultMetric.binary]).toBe('binary')
    expect(metricTasks[defaultMetric.regression]).toBe('regression')
    expect(metricsOfTask('multiclass')).toContain(defaultMetric.multiclass)
    expect(metricsOfTask('multiclass')).toEqual(['log-loss', 'accuracy', 'auc'])
  })
})

describe('policySchema', () => {
  const document = {
    version: 1,
    task: 'regression',
    target: 'minutes_late',
    data: { train: 'data/train.csv', split: { fraction: 0.3 } },
    model: { builtin: { learner: 'gradient-boosting', trees: 50 } },
    importance: { groups: { route: ['distance_km', 'stop_count'] } },
  }

  it('takes plain values as well as YAML text and fills every default', () => {
    const config = policySchema.parse(document)
    expect(config.seed).toBe(1)
    expect(config.data.holdout).toEqual({ kind: 'split', fraction: 0.3 })
    expect(config.model).toMatchObject({ kind: 'builtin', trees: 50, maxDepth: 4 })
    expect(config.importance.metric).toBe('rmse')
    expect(config.importance.groups).toEqual({ route: ['distance_km', 'stop_count'] })
    expect(config.checks.rankShift.action).toBe('warn')
  })

  it('refuses numbers written in other bases or with separators', () => {
    for (const l2 of ['0x10', '1_000', '1,000', 'ten', '']) {
      expect(policySchema.safeParse({ ...document, model: { builtin: { learner: 'linear', l2 } } }).success).toBe(false)
    }
    expect(policySchema.safeParse({ ...document, model: { builtin: { learner: 'linear', l2: '1e-3' } } }).success).toBe(true)
  })

  it('knows the gradient-boosting settings the linear learner refuses', () => {
    const keys = describePolicyKey(['model', 'builtin'])?.keys ?? []
    expect(boostingOnlyKeys.every((key) => keys.includes(key))).toBe(true)
    expect(keys.filter((key) => !(boostingOnlyKeys as readonly string[]).includes(key))).toEqual(['learner', 'l2'])
  })
})
