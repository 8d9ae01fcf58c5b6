import { describe, expect, it } from 'vitest'
import { changedFeatures, diffFeatureSets, featureSetFindings } from '../../../src/core/checks/feature-set.ts'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { sideResult, steady } from './side-results.ts'

const read = (text: string, source = 't.csv') => parseCsv(text, { source, target: 'late', task: 'binary', roles: {} })

describe('diffFeatureSets(base, head)', () => {
  it('names added, removed and re-typed columns by name', () => {
    const base = read('depot,distance_km,weight_kg,late\nnorth,1,2,0\nsouth,3,4,1\n')
    const head = read('depot,distance_km,stops,late\n1,1,5,0\n2,3,6,1\n')
    expect(diffFeatureSets(base, head)).toEqual({
      added: ['stops'],
      removed: ['weight_kg'],
      kindChanged: [{ name: 'depot', base: 'categorical', head: 'numeric' }],
    })
  })
})

describe('changedFeatures(base, head)', () => {
  const train = read('depot,distance_km,late\nnorth,1,0\nsouth,3,1\neast,2,1\n')
  const holdoutOf = (text: string, schemaSource = train) => parseCsv(text, { source: 'h.csv', schema: schemaOf(schemaSource) })

  it('compares categorical values as text, so a new category that shifts the codes changes nothing', () => {
    // The head's training table has one more depot, 'aaa', which sorts first: every code moves by one,
    // but the holdout's depots are the same words.
    const headTrain = read('depot,distance_km,late\nnorth,1,0\nsouth,3,1\neast,2,1\naaa,4,0\n')
    const holdout = 'depot,distance_km,late\nnorth,5,0\neast,6,1\n'
    const base = { train, holdout: holdoutOf(holdout) }
    const head = { train: headTrain, holdout: holdoutOf(holdout, headTrain) }
    expect(head.holdout.columns[0][0]).not.toBe(base.holdout.columns[0][0])
    expect([...changedFeatures(base, head)]).toEqual([])
  })

  it('marks a feature whose holdout values differ, and only that one', () => {
    const base = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,5,0\neast,6,1\n') }
    const head = { train, holdout: holdoutOf('depot,distance_km,late\nnorth,5,0\neast,7,1\n') }
    expect([...changedFeatures(base, head)]).toEqual(['distance_km'])
  })

  it('falls back to the training rows when the holdout counts differ, and says nothing when neither count matches', () => {
    const baseHoldout = holdoutOf('depot,distance_km,late\nnorth,5,0\n')
    const headHoldout = holdoutOf('depot,distance_km,late\nnorth,5,0\neast,6,1\n')
    const headTrain = read('depot,distance_km,late\nnorth,1,0\nwest,3,1\neast,2,1\n')
    expect([...changedFeatures({ train, holdout: baseHoldout }, { train: headTrain, holdout: headHoldout })]).toEqual(['depot'])
    const shorter = read('depot,distance_km,late\nnorth,1,0\nwest,3,1\n')
    expect([...changedFeatures({ train, holdout: baseHoldout }, { train: shorter, holdout: headHoldout })]).toEqual([])
  })
})

describe('featureSetFindings(featureSet, head)', () => {
  const head = sideResult({ features: { distance_km: steady(0.2), roadworks_km: steady(0.05), phase_of_moon: steady(0, 0.01) } })
  const featureSet = { added: ['roadworks_km', 'phase_of_moon'], removed: [], kindChanged: [] }

  it('reports an added feature as unused only when its interval does not lie above zero', () => {
    const findings = featureSetFindings(featureSet, head)
    expect(findings.map((f) => [f.kind, f.feature ?? null])).toEqual([
      ['feature-set', null],
      ['unused-feature', 'phase_of_moon'],
    ])
  })

  it('says nothing when the feature set is the same', () => {
    expect(featureSetFindings({ added: [], removed: [], kindChanged: [] }, head)).toEqual([])
  })
})
