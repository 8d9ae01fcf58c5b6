/**
 * The leak rule's test context, shared by leakage.test.ts and leakage-words.test.ts: the policy
 * defaults written out (defaultChecks.leakage in src/core/policy/policy-defaults.ts, stated here so a
 * change of default shows in the tests), a call of checkLeakage with the pull request's added and
 * changed features, and the base side's three features.
 */
import { checkLeakage, type LeakageOptions } from '../../../src/core/checks/leakage.ts'
import type { SideResult } from '../../../src/core/checks/side-result.ts'
import { steady } from './side-results.ts'

export const options: LeakageOptions = {
  action: 'block',
  task: 'binary',
  metricName: 'log-loss',
  dominanceShare: 0.5,
  runnerUpRatio: 3,
  singleFeaturePower: 0.99,
  relativePower: 0.8,
  liftWarn: 0.15,
  liftBlock: 0.25,
  sliceWarnPower: 0.9,
  reviewedColumns: [],
}

export function check(base: SideResult, head: SideResult, change: { added?: string[]; changed?: string[] } = {}, overrides: Partial<LeakageOptions> = {}) {
  return checkLeakage({ base, head, added: new Set(change.added ?? []), changed: new Set(change.changed ?? []) }, { ...options, ...overrides })
}

export const baseFeatures = { distance_km: steady(0.05), stop_count: steady(0.03), depot: steady(0.01) }
