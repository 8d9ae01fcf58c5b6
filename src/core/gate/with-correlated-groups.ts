import type { Dataset } from '../data/dataset.ts'
import { correlatedGroups } from '../importance/correlated-groups.ts'
import { deriveSeed } from '../statistics/random.ts'
import { fixedSettings, type GateSettings } from './gate-settings.ts'

/**
 * The settings with the automatic feature groups of the head's training rows added to the policy's
 * groups (correlatedGroups at `importance.group_threshold`), so both sides permute them jointly
 * (the base skips a group whose members it lacks). A cluster that repeats a policy group's members,
 * or whose name is taken, is left out. Nothing is added with `checks.correlated_groups.action: off`.
 */
export function withCorrelatedGroups(settings: GateSettings, headTrain: Dataset): GateSettings {
  if (settings.checks.correlatedGroups.action === 'off') return settings
  const taken = new Set([...headTrain.features.map((f) => f.name), ...settings.groups.map((g) => g.name)])
  const explicit = new Set(settings.groups.map((g) => [...g.members].sort().join('\u0000')))
  const automatic = correlatedGroups(headTrain, {
    threshold: settings.groupThreshold,
    maxRows: fixedSettings.correlationRows,
    seed: deriveSeed(settings.seed, 'correlated-groups'),
  }).filter((g) => !taken.has(g.name) && !explicit.has([...g.members].sort().join('\u0000')))
  if (automatic.length === 0) return settings
  return { ...settings, groups: [...settings.groups, ...automatic.map((g) => ({ name: g.name, members: g.members }))], automaticGroups: automatic }
}
