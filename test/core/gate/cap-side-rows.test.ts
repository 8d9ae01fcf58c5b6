import { describe, expect, it } from 'vitest'
import { selectRows, type Dataset } from '../../../src/core/data/dataset.ts'
import { capSideRows } from '../../../src/core/gate/cap-side-rows.ts'
import type { SideInputs } from '../../../src/core/gate/gate-inputs.ts'
import { gateSettings } from '../../../src/core/gate/gate-settings.ts'
import { deriveSeed } from '../../../src/core/statistics/random.ts'
import { testPolicy } from './test-policy.ts'

/** A table whose column `row` holds each row's position in the file, so a sample can be read off it. */
function table(rows: number, source: string, order: (i: number) => number = (i) => i): Dataset {
  const position = Float64Array.from({ length: rows }, (_, i) => order(i))
  return {
    rows,
    source,
    features: [{ name: 'row', kind: 'numeric' }, { name: 'half', kind: 'numeric' }],
    columns: [position, position.map((v) => v / 2)],
    missing: [0, 0],
    target: { name: 'late', values: position.map((v) => v % 2) },
    ids: { name: 'parcel_id', values: Array.from(position, (v) => `P${v}`) },
  }
}

function side(train: Dataset, holdout: Dataset): SideInputs {
  return { ref: 'main', commit: null, train, holdout, reference: train, model: { kind: 'builtin' } }
}

/** The gate settings of the test policy with these row caps (testPolicy writes the data section itself). */
function policyWithCaps(train: number, holdout: number, seed = 3) {
  const config = testPolicy('', { seed })
  return gateSettings({ ...config, data: { ...config.data, maxTrainRows: train, maxHoldoutRows: holdout } })
}

const rowsOf = (data: Dataset) => Array.from(data.columns[0])

describe('capSideRows(sides, settings)', () => {
  it('leaves tables within the caps as they are and records no sampling', () => {
    const base = side(table(300, 'train.csv'), table(100, 'holdout.csv'))
    const out = capSideRows({ base, head: base }, gateSettings(testPolicy()))
    expect(out.sides.base.train).toBe(base.train)
    expect(out.sides.head.holdout).toBe(base.holdout)
    expect(out.sampling).toEqual({ base: {}, head: {} })
  })

  it('keeps the same training and holdout rows on both sides for the same tables, with seeds from the policy seed and the role', () => {
    const settings = policyWithCaps(100, 40)
    const base = side(table(1000, 'train.csv'), table(300, 'holdout.csv'))
    const head = side(table(1000, 'train.csv'), table(300, 'holdout.csv'))
    const out = capSideRows({ base, head }, settings)
    expect(out.sides.base.train.rows).toBe(100)
    expect(out.sides.base.holdout.rows).toBe(40)
    expect(rowsOf(out.sides.head.train)).toEqual(rowsOf(out.sides.base.train))
    expect(rowsOf(out.sides.head.holdout)).toEqual(rowsOf(out.sides.base.holdout))
    const trainSeed = deriveSeed(3, 'row-cap', 'train')
    const holdoutSeed = deriveSeed(3, 'row-cap', 'holdout')
    expect(out.sampling.base).toEqual({
      train: { rows: 1000, kept: 100, seed: trainSeed, sampled: true },
      holdout: { rows: 300, kept: 40, seed: holdoutSeed, sampled: true },
    })
    expect(out.sampling.head).toEqual(out.sampling.base)
    // The reference rows are the training rows (data.reference: train), so they follow its sample.
    expect(out.sides.base.reference).toBe(out.sides.base.train)
    // The holdout-rows check gets the whole holdouts.
    expect(out.holdouts.base.rows).toBe(300)
    // The same seed gives the same rows; another policy seed other rows.
    expect(rowsOf(capSideRows({ base, head }, settings).sides.base.holdout)).toEqual(rowsOf(out.sides.base.holdout))
    expect(rowsOf(capSideRows({ base, head }, policyWithCaps(100, 40, 4)).sides.base.holdout)).not.toEqual(rowsOf(out.sides.base.holdout))
  })

  it('samples the same holdout rows on both sides when the head reorders the holdout file (paired by id)', () => {
    const settings = policyWithCaps(100, 40)
    const holdout = table(300, 'holdout.csv')
    const reversed = selectRows(holdout, Array.from({ length: 300 }, (_, i) => 299 - i))
    const out = capSideRows({ base: side(table(1000, 'train.csv'), holdout), head: side(table(1000, 'train.csv'), reversed) }, settings)
    expect(rowsOf(out.sides.head.holdout)).toEqual(rowsOf(out.sides.base.holdout))
    expect(out.sides.head.holdout.ids!.values).toEqual(out.sides.base.holdout.ids!.values)
  })
})
