import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf } from '../../../src/core/data/parse-csv.ts'
import { userErrorText } from './user-error-text.ts'

// Small invented parcel-courier files (demo scenario): the target is the service a parcel ends up on.
// Every expected value below is worked by hand.
const TRAIN = ['distance_km,service', '12.5,express', '3,standard', '7.25,economy', '4,standard', '9,express'].join('\n')
const options = { source: 'data/train.csv', target: 'service', task: 'multiclass' as const }

describe('parseCsv with task multiclass', () => {
  it('maps the labels to 0..K-1 in text order', () => {
    const data = parseCsv(TRAIN, options)
    expect(data.target?.classes).toEqual(['economy', 'express', 'standard'])
    expect(Array.from(data.target!.values)).toEqual([1, 2, 0, 2, 1])
    expect(schemaOf(data).target).toEqual({ name: 'service', task: 'multiclass', classes: ['economy', 'express', 'standard'] })
  })

  it('orders integer codes by value, so 10 comes after 9', () => {
    const data = parseCsv(['x,grade', '1,10', '2,9', '3,0', '4,9'].join('\n'), { ...options, target: 'grade' })
    expect(data.target?.classes).toEqual(['0', '9', '10'])
    expect(Array.from(data.target!.values)).toEqual([2, 1, 0, 1])
  })

  it('reads a holdout with the training classes, and names the file, line and value of a class training lacks', () => {
    const schema = schemaOf(parseCsv(TRAIN, options))
    const holdout = parseCsv(['distance_km,service', '1,standard', '2,economy'].join('\n'), { source: 'data/holdout.csv', schema })
    expect(Array.from(holdout.target!.values)).toEqual([2, 0])
    expect(userErrorText(() => parseCsv(['distance_km,service', '1,standard', '2,same-day'].join('\n'), { source: 'data/holdout.csv', schema }))).toBe(
      "data/holdout.csv, line 3 (the header is line 1), column 'service': the class 'same-day' does not occur in data/train.csv (its classes: 'economy', 'express', 'standard'). | " +
        "Use only classes that data/train.csv has rows of, or add training rows of 'same-day': a model cannot be scored on a class it never saw.",
    )
  })

  it('refuses fewer than three classes, suggesting task: binary for two', () => {
    expect(userErrorText(() => parseCsv(['x,service', '1,express', '2,standard'].join('\n'), options))).toBe(
      "data/train.csv, column 'service': a multiclass target needs at least three classes, found 2: 'express', 'standard'. | Set task: binary in the policy for a target with two classes.",
    )
  })
})
