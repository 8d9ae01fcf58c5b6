import { describe, expect, it } from 'vitest'
import { changedFeatures, featureSetFindings } from '../../../src/core/checks/feature-set.ts'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { sideResult, steady } from './side-results.ts'

const read = (text: string) => parseCsv(text, { source: 't.csv', target: 'late', task: 'binary', roles: {} })
const holdoutOf = (text: string, train: ReturnType<typeof read>) => parseCsv(text, { source: 'h.csv', schema: schemaOf(train) })

describe('featureSetFindings(featureSet, head): the words', () => {
  const head = sideResult({ features: { distance_km: steady(0.2), roadworks_km: steady(0.05), phase_of_moon: steady(0.001, 0.01) } })

  it('names what was added, removed and re-typed, in that order', () => {
    const findings = featureSetFindings(
      { added: ['roadworks_km'], removed: ['weight_kg', 'stops'], kindChanged: [{ name: 'depot', base: 'categorical', head: 'numeric' }] },
      head,
    )
    expect(findings).toEqual([
      {
        kind: 'feature-set',
        severity: 'info',
        title: 'This pull request added roadworks_km; removed weight_kg, stops; changed the kind of depot (categorical → numeric).',
        message: 'Features are compared by column name. 1 added, 2 removed, 1 changed kind.',
        evidence: { added: 1, removed: 2, kindChanged: 1 },
      },
    ])
  })

  it('lists five names and counts the rest', () => {
    const six = ['a', 'b', 'c', 'd', 'e', 'f']
    expect(featureSetFindings({ added: [], removed: six, kindChanged: [] }, head)[0].title).toBe('This pull request removed a, b, c, d, e and 1 more.')
    expect(featureSetFindings({ added: [], removed: six.slice(0, 5), kindChanged: [] }, head)[0].title).toBe('This pull request removed a, b, c, d, e.')
    expect(featureSetFindings({ added: [], removed: [], kindChanged: [{ name: 'depot', base: 'numeric', head: 'categorical' }] }, head)[0].title).toBe(
      'This pull request changed the kind of depot (numeric → categorical).',
    )
  })

  it('says an added feature at the floor is not measurably used, with its interval', () => {
    const unit = head.importances.find((u) => u.name === 'phase_of_moon')!
    expect(unit.isAboveFloor).toBe(false)
    const findings = featureSetFindings({ added: ['phase_of_moon', 'not_measured'], removed: [], kindChanged: [] }, head)
    expect(findings[1]).toEqual({
      kind: 'unused-feature',
      severity: 'info',
      feature: 'phase_of_moon',
      title: 'The added feature phase_of_moon is not measurably used by the candidate model.',
      message: 'Its importance 0.001 has a 95% interval [-0.008816, 0.01082] that does not lie above zero.',
      evidence: { mean: unit.mean, lower: unit.lower, upper: unit.upper },
    })
    // steady(0.001, 0.01): SD 0.01·sqrt(0.625) = 0.0079057 over 5 refits, t(0.975, 4) = 2.7764451 (scipy.stats.t.ppf,
    // SciPy 1.10.1): half-width 0.0098163, so [−0.0088163, 0.0108163].
    expect(unit.lower).toBeCloseTo(0.001 - 2.7764451051977987 * 0.01 * Math.sqrt(0.625 / 5), 9)
    expect(findings).toHaveLength(2)
  })
})

describe('changedFeatures(base, head): what counts as a change', () => {
  it('counts a missing value against a present one, but not two missing values', () => {
    const train = read('depot,distance_km,late\nnorth,1,0\nsouth,3,1\n')
    const base = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,,0\nsouth,4,1\n', train) }
    const same = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,,0\nsouth,4,1\n', train) }
    const filled = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,5,0\nsouth,4,1\n', train) }
    expect([...changedFeatures(base, same)]).toEqual([])
    expect([...changedFeatures(base, filled)]).toEqual(['distance_km'])
  })

  it('reads every row, the last one too', () => {
    const train = read('depot,distance_km,late\nnorth,1,0\nsouth,3,1\n')
    const base = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,5,0\nsouth,4,1\n', train) }
    const last = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,5,0\nnorth,4,1\n', train) }
    expect([...changedFeatures(base, last)]).toEqual(['depot'])
  })

  it('skips a column only the head has, and counts a re-typed column whose text matches as changed', () => {
    const baseTrain = read('depot,zone,late\nnorth,1,0\nsouth,2,1\n')
    const headTrain = read('depot,zone,stops,late\nnorth,1,3,0\nsouth,2,4,1\n')
    const base = { train: baseTrain, holdout: holdoutOf('depot,zone,late\nnorth,1,0\nsouth,2,1\n', baseTrain) }
    const head = { train: headTrain, holdout: holdoutOf('depot,zone,stops,late\nnorth,1,3,0\nsouth,2,4,1\n', headTrain) }
    expect([...changedFeatures(base, head)]).toEqual([])
    // zone as numbers 1, 2 on the base and as the categories '1', '2' on the head: another kind of value.
    const typed = parseCsv('depot,zone,late\nnorth,1,0\nsouth,2,1\n', { source: 't.csv', target: 'late', task: 'binary', roles: { zone: 'categorical' } })
    expect(typed.features.find((f) => f.name === 'zone')!.kind).toBe('categorical')
    const retyped = { train: typed, holdout: holdoutOf('depot,zone,late\nnorth,1,0\nsouth,2,1\n', typed) }
    expect([...changedFeatures(base, retyped)]).toEqual(['zone'])
  })
})
