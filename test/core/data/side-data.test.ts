import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { assembleSideData, sideDataFiles } from '../../../src/core/data/side-data.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'

const policy = (extra: string) =>
  parsePolicy(`version: 1\ntask: binary\ntarget: late\ndata:\n  train: data/train.parquet\n  holdout: data/holdout.csv\n  unlabeled: data/recent.parquet\nmodel:\n  builtin: { learner: gradient-boosting }\n${extra}`, {
    source: 'plumbline.yml',
  })

describe('sideDataFiles and assembleSideData with data.unlabeled', () => {
  it('reads the unlabeled rows against the training schema, without a target, when sensitivity is on', () => {
    expect(sideDataFiles(policy('')).map((f) => [f.role, f.path, f.requireTarget, f.conformToTrain])).toEqual([
      ['train', 'data/train.parquet', true, false],
      ['holdout', 'data/holdout.csv', true, true],
      ['unlabeled', 'data/recent.parquet', false, true],
    ])
    expect(sideDataFiles(policy('checks:\n  sensitivity: { action: off }\n')).map((f) => f.role)).toEqual(['train', 'holdout'])
  })

  it('hands the unlabeled table on', () => {
    const train = parseCsv('km,late\n1,0\n2,1\n', { source: 'train', target: 'late' })
    const holdout = parseCsv('km,late\n3,1\n', { source: 'holdout', schema: schemaOf(train) })
    const unlabeled = parseCsv('km\n4\n5\n', { source: 'recent', schema: schemaOf(train), requireTarget: false })
    expect(assembleSideData(policy(''), { train, holdout, unlabeled }).unlabeled).toBe(unlabeled)
  })
})
