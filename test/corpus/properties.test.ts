/**
 * Property tests (fast-check 4) for the three readers of text a pull request controls: the CSV
 * reader, the policy loader and the markdown escapers. Whatever the input, the CSV reader and the
 * policy loader return a value or throw a UserError naming the file (never another error); a
 * generated table reads back exactly; escaped text holds no character that could open markup,
 * end a table cell or drive a terminal. Seeded, so a failure reproduces.
 */
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { stringify } from 'yaml'
import { parseCsv } from '../../src/core/data/parse-csv.ts'
import { UserError } from '../../src/core/errors.ts'
import { parsePolicy } from '../../src/core/policy/parse-policy.ts'
import { escapeMarkdownCell, escapeMarkdownText, escapePlainText } from '../../src/core/report/escape.ts'
import { smallPolicy } from '../helpers/make-repository.ts'

const settings = { numRuns: 400, seed: 20261202 }

/** Runs `read`; a UserError must name `source`; anything else thrown fails the property. */
function valueOrUserError(read: () => unknown, source: string): void {
  try {
    read()
  } catch (error) {
    if (!(error instanceof UserError)) throw error
    expect(error.message.startsWith(source)).toBe(true)
  }
}

/** Text made of what CSV and YAML treat specially, plus any unicode. */
const awkwardText = fc.string({
  unit: fc.oneof(
    { weight: 3, arbitrary: fc.constantFrom(',', '"', '\n', '\r', ' ', 'a', '1', '.', 'e', '-', 'NA', ':', '#', '&', '*', '!', '[', ']', '{', '}', '|', '>', '\t', '\u0000', '\uFEFF') },
    { weight: 1, arbitrary: fc.string({ unit: 'grapheme', maxLength: 2 }) },
  ),
  maxLength: 300,
})

describe('parseCsv on any text', () => {
  it('returns a dataset or throws a UserError naming the file', () => {
    fc.assert(
      fc.property(awkwardText, fc.constantFrom('binary' as const, 'regression' as const, undefined), (text, task) => {
        valueOrUserError(() => parseCsv(text, { source: 'data/train.csv', target: 'late', ...(task ? { task } : {}) }), 'data/train.csv')
        valueOrUserError(() => parseCsv(`a,late\n${text}`, { source: 'data/train.csv', target: 'late' }), 'data/train.csv')
      }),
      settings,
    )
  })

  it('reads a generated numeric table back exactly (values written with Number#toString)', () => {
    const cell = fc.oneof(fc.integer({ min: -1e9, max: 1e9 }), fc.double({ min: -1e50, max: 1e50, noNaN: true, noDefaultInfinity: true }))
    fc.assert(
      fc.property(fc.array(fc.tuple(cell, cell, fc.constantFrom(0, 1)), { minLength: 2, maxLength: 40 }), (rows) => {
        const table = rows.map(([a, b, y], i) => [a, b, i < 2 ? i : y])
        const text = `x,y,late\n${table.map((r) => r.join(',')).join('\n')}\n`
        const data = parseCsv(text, { source: 't.csv', target: 'late', task: 'binary' })
        expect(data.rows).toBe(table.length)
        expect(Array.from(data.columns[0])).toEqual(table.map((r) => r[0] + 0))
        expect(Array.from(data.columns[1])).toEqual(table.map((r) => r[1] + 0))
        expect(Array.from(data.target!.values)).toEqual(table.map((r) => r[2]))
      }),
      settings,
    )
  })
})

describe('parsePolicy on any text', () => {
  it('returns a config or throws a UserError naming the file', () => {
    fc.assert(fc.property(awkwardText, (text) => valueOrUserError(() => parsePolicy(text, { source: 'plumbline.yml' }), 'plumbline.yml')), settings)
  })

  it('on any JSON value written as YAML, and on the small policy with anything appended or a value replaced', () => {
    const policy = smallPolicy()
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 4 }), awkwardText, fc.nat({ max: policy.length }), (value, text, at) => {
        valueOrUserError(() => parsePolicy(stringify(value), { source: 'plumbline.yml' }), 'plumbline.yml')
        valueOrUserError(() => parsePolicy(`${policy}${text}`, { source: 'plumbline.yml' }), 'plumbline.yml')
        valueOrUserError(() => parsePolicy(`${policy.slice(0, at)}${text}${policy.slice(at)}`, { source: 'plumbline.yml' }), 'plumbline.yml')
      }),
      { ...settings, numRuns: 300 },
    )
  })
})

describe('the markdown escapers on any text', () => {
  // eslint-disable-next-line no-control-regex
  const controls = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/
  it('escapeMarkdownCell: one line, no raw < > or unescaped |, no control or bidirectional character', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 200 }), (text) => {
        const cell = escapeMarkdownCell(text)
        expect(cell).not.toMatch(/[\n\r<>]/)
        expect(cell).not.toMatch(controls)
        expect(cell).not.toMatch(/(^|[^\\])(\\\\)*\|/)
      }),
      settings,
    )
  })

  it('escapeMarkdownText: no raw < or >, no control character but line feeds, every backtick and bracket escaped', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 200 }), (text) => {
        const escaped = escapeMarkdownText(text)
        expect(escaped).not.toMatch(/[<>]/)
        expect(escaped).not.toMatch(controls)
        expect(escaped).not.toMatch(/(^|[^\\])(\\\\)*[`[\]]/)
      }),
      settings,
    )
  })

  it('escapePlainText: one line, no control character', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 200 }), (text) => {
        const plain = escapePlainText(text)
        expect(plain).not.toMatch(/[\n\r]/)
        expect(plain).not.toMatch(controls)
      }),
      settings,
    )
  })
})
