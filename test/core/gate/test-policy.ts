import type { GateConfig } from '../../../src/core/config.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'

/**
 * The small policy the gate-stage tests run with (60 trees by default, 3 refits × 3 draws), plus
 * `extra` YAML at the top level. Binary on `late` unless `task` / `target` / `metric` say otherwise.
 */
export function testPolicy(extra = '', options: { task?: string; target?: string; metric?: string; trees?: number; seed?: number } = {}): GateConfig {
  return parsePolicy(
    `version: 1
task: ${options.task ?? 'binary'}
target: ${options.target ?? 'late'}
seed: ${options.seed ?? 3}
data:
  train: train.csv
  holdout: holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
    trees: ${options.trees ?? 60}
importance:
${options.metric ? `  metric: ${options.metric}\n` : ''}  refits: 3
  draws: 3
${extra}`,
    { source: 'plumbline.yml' },
  )
}
