import { describe, expect, it } from 'vitest'
import { checkHoldoutRows, type HoldoutIdentity } from '../../../src/core/checks/holdout-rows.ts'

const fixText = 'Score and importance differences between the sides would then mix the change with a different sample. ' +
  'Keep the holdout fixed in the pull request (or split by an id column with data.split.by), then rerun.'

function holdout(side: 'base' | 'head', target: number[], ids?: string[]): HoldoutIdentity {
  return { source: `${side}: data/holdout.csv`, rows: target.length, target: Float64Array.from(target), ...(ids ? { ids, idName: 'parcel_id' } : {}) }
}

describe('checkHoldoutRows(base, head, action)', () => {
  it('blocks when the row counts differ, in these words', () => {
    const findings = checkHoldoutRows(holdout('base', [0, 1, 0, 1]), holdout('head', [0, 1, 0]), 'block')
    expect(findings).toEqual([
      {
        kind: 'holdout-rows',
        severity: 'block',
        title: 'The two sides are not scored on the same holdout rows: 4 rows on the base side, 3 on the head.',
        message: `The base holdout (base: data/holdout.csv) has 4 rows and the head holdout (head: data/holdout.csv) has 3. ${fixText}`,
        evidence: { baseRows: 4, headRows: 3 },
      },
    ])
  })

  it('compares ids position by position and counts ids only the head has', () => {
    const base = holdout('base', [0, 1, 0, 1, 1], ['P1', 'P2', 'P3', 'P4', 'P5'])
    const head = holdout('head', [0, 1, 0, 1, 1], ['P1', 'P3', 'P2', 'P4', 'P9'])
    const [finding] = checkHoldoutRows(base, head, 'block')
    // By hand: rows 2, 3 and 5 differ by position; P9 is the one head id the base lacks.
    expect(finding.title).toBe('The two sides are not scored on the same holdout rows: 3 of 5 ids differ by position (1 id only on the head).')
    expect(finding.message).toBe(
      "Holdout row 2 has parcel_id 'P2' on the base side and 'P3' on the head; 3 of 5 rows differ by position and 1 head id does not occur on the base side. " +
        fixText,
    )
    expect(finding.evidence).toEqual({ baseRows: 5, headRows: 5, differingRows: 3, idsOnlyOnHead: 1, firstDifferingRow: 2 })
  })

  it('compares the target row by row when there is no id column, and says so', () => {
    const [finding] = checkHoldoutRows(holdout('base', [0, 1, 0, 1]), holdout('head', [0, 1, 1, 1]), 'warn')
    expect(finding.severity).toBe('warn')
    expect(finding.title).toBe('The two sides are not scored on the same holdout rows: the target differs in 1 of 4 rows.')
    expect(finding.message).toBe(`Without an id column only the target can be compared row by row; it differs in 1 of 4 rows (first at holdout row 3). ${fixText}`)
    expect(finding.evidence).toEqual({ baseRows: 4, headRows: 4, differingRows: 1, firstDifferingRow: 3 })
  })

  it('finds nothing for the same rows (NaN targets equal to NaN), and nothing when the check is off', () => {
    expect(checkHoldoutRows(holdout('base', [0.5, NaN, 2]), holdout('head', [0.5, NaN, 2]), 'block')).toEqual([])
    const ids = ['P1', 'P2']
    expect(checkHoldoutRows(holdout('base', [0, 1], ids), holdout('head', [0, 1], [...ids]), 'block')).toEqual([])
    expect(checkHoldoutRows(holdout('base', [0, 1, 0]), holdout('head', [1]), 'off')).toEqual([])
  })
})

describe('checkHoldoutRows with the same ids and other labels', () => {
  it('blocks a relabelled holdout: a changed label under the same id is a changed holdout', () => {
    const ids = ['P1', 'P2', 'P3', 'P4']
    const [finding] = checkHoldoutRows(holdout('base', [0, 1, 0, 1], ids), holdout('head', [0, 0, 0, 0], ids), 'block')
    expect(finding).toMatchObject({
      kind: 'holdout-rows',
      severity: 'block',
      title: 'The two sides are not scored on the same holdout rows: the same ids carry another label in 2 of 4 rows.',
      evidence: { baseRows: 4, headRows: 4, relabelledRows: 2, firstDifferingRow: 2 },
    })
    expect(finding.message).toBe(`The ids match row by row, but the target differs in 2 of 4 rows (first at holdout row 2, parcel_id 'P2'): the pull request relabelled the holdout. ${fixText}`)
    expect(checkHoldoutRows(holdout('base', [0, 1], ['A', 'B']), holdout('head', [0, 1], ['A', 'B']), 'block')).toEqual([])
  })
})

describe('checkHoldoutRows: plural words, the first and last rows, ids on one side only', () => {
  it('says "ids" and "do" for several head-only ids, and names the first differing row even when it is row 1', () => {
    const base = holdout('base', [0, 1, 0], ['P1', 'P2', 'P3'])
    const head = holdout('head', [0, 1, 0], ['P7', 'P8', 'P3'])
    const [finding] = checkHoldoutRows(base, head, 'block')
    expect(finding.title).toBe('The two sides are not scored on the same holdout rows: 2 of 3 ids differ by position (2 ids only on the head).')
    expect(finding.message).toBe(
      "Holdout row 1 has parcel_id 'P1' on the base side and 'P7' on the head; 2 of 3 rows differ by position and 2 head ids do not occur on the base side. " + fixText,
    )
    expect(finding.evidence).toMatchObject({ differingRows: 2, firstDifferingRow: 1 })
  })

  it('says "id" when the id column has no name', () => {
    const base: HoldoutIdentity = { source: 'b', rows: 2, target: Float64Array.from([0, 1]), ids: ['P1', 'P2'] }
    const head: HoldoutIdentity = { source: 'h', rows: 2, target: Float64Array.from([0, 1]), ids: ['P1', 'P9'] }
    expect(checkHoldoutRows(base, head, 'block')[0].message).toMatch(/^Holdout row 2 has id 'P2' on the base side and 'P9' on the head; /)
    const relabelled: HoldoutIdentity = { ...head, ids: ['P1', 'P2'], target: Float64Array.from([1, 1]) }
    expect(checkHoldoutRows(base, relabelled, 'block')[0].message).toMatch(/\(first at holdout row 1, id 'P1'\): the pull request relabelled the holdout\./)
  })

  it('reads the last row too, and counts a first-row difference once', () => {
    const [last] = checkHoldoutRows(holdout('base', [0, 1, 0]), holdout('head', [0, 1, 1]), 'block')
    expect(last.evidence).toMatchObject({ differingRows: 1, firstDifferingRow: 3 })
    const [both] = checkHoldoutRows(holdout('base', [0, 1, 0]), holdout('head', [1, 1, 1]), 'block')
    expect(both.evidence).toMatchObject({ differingRows: 2, firstDifferingRow: 1 })
    const [ids] = checkHoldoutRows(holdout('base', [0, 1, 0], ['P1', 'P2', 'P3']), holdout('head', [0, 1, 0], ['P1', 'P2', 'P4']), 'block')
    expect(ids.evidence).toMatchObject({ differingRows: 1, firstDifferingRow: 3 })
  })

  it('falls back to the target when only one side has ids, and takes a missing target against a value as a difference', () => {
    const base = holdout('base', [0, 1, NaN], ['P1', 'P2', 'P3'])
    const head = holdout('head', [0, 1, NaN])
    expect(checkHoldoutRows(base, head, 'block')).toEqual([])
    const [finding] = checkHoldoutRows(base, holdout('head', [0, 1, 1]), 'block')
    expect(finding.title).toBe('The two sides are not scored on the same holdout rows: the target differs in 1 of 3 rows.')
    const [reverse] = checkHoldoutRows(holdout('base', [0, 1, 1]), head, 'block')
    expect(reverse.evidence).toMatchObject({ differingRows: 1, firstDifferingRow: 3 })
  })
})
