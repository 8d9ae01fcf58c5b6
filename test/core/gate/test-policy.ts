import type { GateConfig } from '../../../src/core/config.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'

/** The small binary policy the gate-stage tests run with (60 trees, 3 refits × 3 draws), plus `extra` YAML at the top level. */
export function testPolicy(extra = ''): GateConfig {
  return parsePolicy(
    `version: 1
task: binary
target: late
seed: 3
data:
  train: train.csv
  holdout: holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
    trees: 60
importance:
  refits: 3
  draws: 3
${extra}`,
    { source: 'plumbline.yml' },
  )
}
