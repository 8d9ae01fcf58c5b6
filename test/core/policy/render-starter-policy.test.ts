import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { proposeTarget, renderStarterPolicy, type StarterColumn } from '../../../src/core/policy/render-starter-policy.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'
import { describePolicyKey, listPolicyKeys } from '../../../src/core/policy/describe-policy-key.ts'
import { formatKeyPath } from '../../../src/core/policy/format-key-path.ts'
import { UserError } from '../../../src/core/errors.ts'

const source = 'plumbline.yml'

const column = (name: string, kind: StarterColumn['kind'], distinct: number, extra: Partial<StarterColumn> = {}): StarterColumn => ({
  name,
  kind,
  distinct,
  missing: 0,
  looksLikeId: false,
  ...extra,
})

/** A summary of the demo courier table (invented for the demo): which parcels were delivered late. */
const parcels: StarterColumn[] = [
  column('parcel_id', 'categorical', 5000, { looksLikeId: true }),
  column('depot', 'categorical', 12),
  column('distance_km', 'numeric', 4812, { missing: 3 }),
  column('stop_count', 'numeric', 40),
  column('service level', 'categorical', 1),
  column('late', 'numeric', 2),
]

const render = (columns: readonly StarterColumn[], extra: { suggestedTarget?: string; task?: 'binary' | 'regression' | 'multiclass' } = {}) =>
  renderStarterPolicy({ trainPath: 'data/train.csv', columns, rows: 5000, ...extra })

/** Key paths of every line that sets a key, commented out or not (indentation two spaces per level). */
function writtenKeyPaths(text: string): Set<string> {
  const paths = new Set<string>()
  const stack: string[] = []
  for (const line of text.split('\n')) {
    const match = /^( *)(?:# )?([A-Za-z_][A-Za-z0-9_]*):/.exec(line)
    if (!match) continue
    const depth = match[1].length / 2
    stack.length = depth
    stack.push(match[2])
    paths.add(formatKeyPath(stack))
  }
  return paths
}

/** Removes the '# ' of every commented default whose parent line is in force, as a user would. */
function uncommentDefaults(text: string): string {
  // importance.metric has no single default (it follows the task); the starter writes the task's one.
  const defaults = new Set([...listPolicyKeys().filter((path) => describePolicyKey(path)?.default !== undefined).map(formatKeyPath), 'importance.metric'])
  const lines = text.split('\n')
  const stack: { key: string; isCommented: boolean }[] = []
  return lines
    .map((line) => {
      const match = /^( *)(# )?([A-Za-z_][A-Za-z0-9_]*):/.exec(line)
      if (!match) return line
      const depth = match[1].length / 2
      stack.length = depth
      const isParentInForce = stack.every((entry) => !entry.isCommented)
      const path = formatKeyPath([...stack.map((entry) => entry.key), match[3]])
      const uncomment = match[2] !== undefined && isParentInForce && defaults.has(path)
      stack.push({ key: match[3], isCommented: match[2] !== undefined && !uncomment })
      return uncomment ? line.replace('# ', '') : line
    })
    .join('\n')
}

describe('proposeTarget(columns)', () => {
  it('prefers a column named like a label, whole name first', () => {
    expect(proposeTarget([column('late', 'numeric', 2), column('Label', 'categorical', 2)])).toBe('Label')
    expect(proposeTarget([column('delivery_outcome', 'categorical', 2), column('y', 'numeric', 90)])).toBe('y')
    expect(proposeTarget([column('weekend', 'numeric', 2), column('deliveryOutcome', 'categorical', 2)])).toBe('deliveryOutcome')
  })

  it('falls back to a two-valued column, the last of several', () => {
    expect(proposeTarget(parcels)).toBe('late')
    expect(proposeTarget([column('late', 'numeric', 2), column('weekend', 'numeric', 2)])).toBe('weekend')
  })

  it('never proposes an id-like or constant column, and proposes nothing when nothing fits', () => {
    expect(proposeTarget([column('target', 'numeric', 5000, { looksLikeId: true }), column('label', 'categorical', 1)])).toBeUndefined()
    expect(proposeTarget([column('distance_km', 'numeric', 4812), column('depot', 'categorical', 12)])).toBeUndefined()
  })
})

describe('renderStarterPolicy(input)', () => {
  it('writes the guessed target, task and roles, saying what was guessed', () => {
    const text = render(parcels, { suggestedTarget: proposeTarget(parcels) })
    const lines = text.split('\n')
    expect(lines).toContain("task: binary  # guessed: 'late' has two distinct values")
    expect(lines).toContain('target: late  # guessed: the only column with two distinct values')
    expect(lines).toContain('    by: parcel_id                  # guessed: hashing the id holds out the same rows on both sides')
    expect(lines).toContain('    parcel_id: id                  # guessed: a different value in each of the 5,000 rows')
    // A role the reader infers from the values is a comment, so removing the column needs no policy edit.
    expect(text).toMatch(/^ {4}# distance_km: numeric +# inferred: 4,812 distinct values, 3 missing$/m)
    expect(lines).toContain('    "service level": ignore        # guessed: the same value in every row')
    expect(text).toContain("# Written by 'plumbline init' from data/train.csv (5,000 rows, 6 columns).")
  })

  it('parses with parsePolicy to the guessed target and roles', () => {
    const config = parsePolicy(render(parcels), { source })
    expect(config.target).toBe('late')
    expect(config.task).toBe('binary')
    expect(config.data.holdout).toEqual({ kind: 'split', fraction: 0.2, by: 'parcel_id' })
    expect(config.data.columns).toEqual({ parcel_id: 'id', 'service level': 'ignore' })
    expect(config.model).toMatchObject({ kind: 'builtin', learner: 'gradient-boosting' })
  })

  it('names an existing holdout file instead of a split', () => {
    const config = parsePolicy(renderStarterPolicy({ trainPath: 'data/train.csv', columns: parcels, rows: 5000, holdoutPath: 'data/holdout.csv' }), { source })
    expect(config.data.holdout).toEqual({ kind: 'file', path: 'data/holdout.csv' })
  })

  it('shows every key of the policy, in its section', () => {
    const written = writtenKeyPaths(render(parcels))
    expect(listPolicyKeys().map(formatKeyPath).filter((path) => !written.has(path))).toEqual([])
  })

  it('comments out true defaults: uncommenting them changes nothing', () => {
    for (const task of ['binary', 'regression'] as const) {
      const text = render(parcels, { task })
      const uncommented = uncommentDefaults(text)
      expect(uncommented).not.toBe(text)
      expect(uncommented).toContain('\n    trees: 200\n')
      expect(uncommented).toContain(`\n  metric: ${task === 'binary' ? 'log-loss' : 'rmse'} `)
      expect(parsePolicy(uncommented, { source })).toEqual(parsePolicy(text, { source }))
    }
  })

  it('guesses regression for a numeric target with many values, and keeps a task it is given', () => {
    const columns = [column('minutes_late', 'numeric', 380), column('distance_km', 'numeric', 4812)]
    const text = render(columns, { suggestedTarget: 'minutes_late' })
    expect(text).toContain("task: regression      # guessed: 'minutes_late' is numeric with 380 distinct values")
    expect(text).toContain('target: minutes_late  # the column to predict')
    expect(parsePolicy(text, { source }).importance.metric).toBe('rmse')
    expect(render(columns, { suggestedTarget: 'minutes_late', task: 'binary' })).toContain(
      "task: binary          # check this: 'minutes_late' has 380 distinct values, binary needs two",
    )
  })

  it('guesses multiclass for a text target with three or more categories, and asks about a few numeric codes', () => {
    const columns = [column('service_tier', 'categorical', 3), column('distance_km', 'numeric', 4812)]
    const text = render(columns, { suggestedTarget: 'service_tier' })
    expect(text).toMatch(/task: multiclass +# guessed: 'service_tier' has 3 categories/)
    expect(parsePolicy(text, { source }).task).toBe('multiclass')
    expect(render(columns, { suggestedTarget: 'service_tier', task: 'regression' })).toMatch(/# check this: 'service_tier' is not numeric/)
    const coded = [column('tier_code', 'numeric', 3), column('distance_km', 'numeric', 4812)]
    expect(render(coded, { suggestedTarget: 'tier_code' })).toMatch(/task: regression +# guessed: 'tier_code' is numeric with 3 distinct values; if these are classes, set multiclass/)
    expect(render(columns, { suggestedTarget: 'service_tier', task: 'multiclass' })).not.toContain('check this')
  })

  it('leaves a marked placeholder when no column looks like a label, and still parses', () => {
    const columns = [column('distance_km', 'numeric', 4812), column('depot', 'categorical', 12)]
    const text = render(columns)
    expect(text).toContain('target: SET_TARGET_COLUMN  # no column looked like a label: set the column to predict and delete its line under data.columns')
    expect(text).toContain('    # by: <id column>')
    expect(parsePolicy(text, { source }).data.columns).toEqual({})
  })

  it('refuses a suggested target that is not a column', () => {
    expect(() => render(parcels, { suggestedTarget: 'lateness' })).toThrow(
      new UserError(
        "The target 'lateness' is not a column of data/train.csv (columns: parcel_id, depot, distance_km, stop_count, service level, late).",
        'Name one of the columns of data/train.csv as the target.',
      ),
    )
  })

  it('round-trips any column names and summaries through parsePolicy', () => {
    const name = fc.string({ minLength: 1, maxLength: 12, unit: fc.constantFrom('a', 'Z', '7', '_', ' ', ':', '#', '"', "'", '-', '[', 'é', '\\', '.', '\t') })
    const summary = fc.record({
      kind: fc.constantFrom('numeric' as const, 'categorical' as const),
      distinct: fc.integer({ min: 0, max: 50 }),
      missing: fc.integer({ min: 0, max: 5 }),
      looksLikeId: fc.boolean(),
    })
    fc.assert(
      fc.property(fc.uniqueArray(fc.tuple(name, summary), { minLength: 1, maxLength: 8, selector: ([n]) => n }), (entries) => {
        const columns = entries.map(([n, s]) => ({ name: n, ...s }))
        const config = parsePolicy(renderStarterPolicy({ trainPath: 'data/my train.csv', columns, rows: 50 }), { source })
        const target = proposeTarget(columns)
        expect(config.target).toBe(target ?? 'SET_TARGET_COLUMN')
        expect(config.data.train).toBe('data/my train.csv')
        // Only the roles that cannot be inferred from the values are written: id and ignore.
        const declared = columns.filter((c) => c.name !== target && (c.looksLikeId || c.distinct <= 1)).map((c) => c.name)
        expect(Object.keys(config.data.columns).sort()).toEqual(declared.sort())
      }),
      { seed: 11, numRuns: 100 },
    )
  })
})
