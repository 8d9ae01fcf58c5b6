import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { describePolicyKey, listPolicyKeys } from '../../../src/core/policy/describe-policy-key.ts'
import { formatKeyPath } from '../../../src/core/policy/format-key-path.ts'

describe('describePolicyKey(path)', () => {
  it('gives the keys of a section in the order of the schema', () => {
    expect(describePolicyKey(['checks'])?.keys).toEqual(['leakage', 'rank_shift', 'score', 'holdout_rows', 'sensitivity', 'gain', 'correlated_groups', 'slices'])
    expect(describePolicyKey(['importance'])?.keys).toEqual(['metric', 'draws', 'refits', 'reference_rows', 'evaluation_rows', 'drop_column_top', 'drop_group_top', 'groups', 'group_threshold'])
  })

  it('gives the default of a setting, as YAML would write it', () => {
    expect(describePolicyKey(['checks', 'rank_shift', 'action'])?.default).toBe('warn')
    expect(describePolicyKey(['data', 'reference'])?.default).toBe('train')
    expect(describePolicyKey(['model', 'builtin', 'max_bins'])?.default).toBe(255)
    expect(describePolicyKey(['target'])).not.toHaveProperty('default')
  })

  it('tells open mappings and lists from sections, and knows no other keys', () => {
    expect(describePolicyKey(['data', 'columns'])?.isOpenMapping).toBe(true)
    expect(describePolicyKey(['importance', 'groups', 'route'])?.isList).toBe(true)
    expect(describePolicyKey(['importance', 'groups', 'route', 0])?.isList).toBe(false)
    expect(describePolicyKey(['checks', 'leakage', 'acton'])).toBeUndefined()
  })
})

describe('docs/policy.md', () => {
  const docs = readFileSync(new URL('../../../docs/policy.md', import.meta.url), 'utf8')
  const rows = new Map(
    docs
      .split('\n')
      .filter((line) => line.startsWith('| `'))
      .map((line) => [line.slice(3, line.indexOf('`', 3)), line.split(' | ').map((cell) => cell.trim())] as const),
  )

  it('has a row for every key of the policy', () => {
    const keys = listPolicyKeys().map(formatKeyPath)
    expect(keys.filter((key) => !rows.has(key))).toEqual([])
    expect(keys.length).toBeGreaterThan(50)
  })

  it('gives each key the default the schema applies', () => {
    for (const path of listPolicyKeys()) {
      const described = describePolicyKey(path)
      if (described?.default === undefined) continue
      // Column 3 of a row is the default; text defaults are in backticks, an empty mapping is "empty".
      const cell = rows.get(formatKeyPath(path))![2]
      const expected = typeof described.default === 'object' ? ['empty'] : [String(described.default), `\`${String(described.default)}\``]
      expect(expected).toContain(cell)
    }
  })
})
