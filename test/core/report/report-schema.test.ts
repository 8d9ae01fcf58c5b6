import { readFileSync } from 'node:fs'

import { describe, expect, it } from 'vitest'

import { UserError } from '../../../src/core/errors.ts'
import { renderMarkdown } from '../../../src/core/report/render-markdown.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { gateReportJsonSchema, parseGateReport, reportLimits } from '../../../src/core/report/report-schema.ts'
import { courierReport, oversizedReport } from './courier-report.ts'

/** What the publish step reads: the report as JSON.stringify wrote it, parsed back. */
const asJson = (report: GateReport): any => JSON.parse(JSON.stringify(report))
const source = 'uploaded/plumbline-report.json'

function problemOf(json: unknown): string {
  try {
    parseGateReport(json, source)
  } catch (error) {
    expect(error).toBeInstanceOf(UserError)
    return (error as UserError).message
  }
  throw new Error('parseGateReport accepted the tampered report')
}

describe('parseGateReport(json, source)', () => {
  it('reads back the report the renderers get, unchanged', () => {
    const report = courierReport()
    const parsed = parseGateReport(asJson(report), source)
    expect(parsed).toEqual(report)
    expect(renderMarkdown(parsed)).toBe(renderMarkdown(report))
  })

  it('reads undefined statistics, written by JSON.stringify as null, back as NaN', () => {
    const report = courierReport()
    const head = report.features[0].head!
    const withUndefined: GateReport = {
      ...report,
      features: [{ ...report.features[0], head: { ...head, lower: NaN, upper: NaN, singleFeatureScore: NaN } }],
      agreement: { ...report.agreement!, kendallTau: NaN, nullKendallTau: [NaN, 1], kendallTauThreshold: NaN },
      sides: { ...report.sides!, base: { ...report.sides!.base, scoreSd: NaN } },
    }
    const json = asJson(withUndefined)
    expect(json.agreement.kendallTau).toBeNull()
    expect(json.features[0].head.singleFeatureScore).toBeNull()
    expect(parseGateReport(json, source)).toEqual(withUndefined)
  })

  it('reads an error report with no sides and empty settings', () => {
    const report: GateReport = {
      ...courierReport(),
      verdict: 'error',
      findings: [{ kind: 'run-error', severity: 'block', title: 'The check could not run.', message: 'x', evidence: { isUserError: true } }],
      features: [],
      agreement: null,
      sides: null,
      settings: { ...courierReport().settings, target: '', metric: '', draws: 0, refits: 0, seed: 0, checks: {} },
      timings: {},
    }
    expect(parseGateReport(asJson(report), source)).toEqual(report)
  })

  it('reads 5,000 features and 2,000 findings', () => {
    const report = oversizedReport(5000, 2000)
    expect(parseGateReport(asJson(report), source)).toEqual(report)
  })

  it('rejects an extra key, at the top or deep inside, naming the file and the path', () => {
    expect(problemOf({ ...asJson(courierReport()), approvedBy: 'mallory' })).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  (top level): Unrecognized key: "approvedBy"`,
    )
    const json = asJson(courierReport())
    json.features[2].head.override = true
    expect(problemOf(json)).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  features[2].head: Unrecognized key: "override"`,
    )
  })

  it('rejects a verdict outside the enum', () => {
    expect(problemOf({ ...asJson(courierReport()), verdict: 'approve' })).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  verdict: Invalid option: expected one of "pass"|"warn"|"block"|"error"`,
    )
  })

  it('rejects NaN (null in JSON) and infinities where a number is required', () => {
    const report = courierReport()
    const nanMean = asJson({ ...report, features: [{ ...report.features[0], head: { ...report.features[0].head!, mean: NaN } }] })
    expect(nanMean.features[0].head.mean).toBeNull()
    expect(problemOf(nanMean)).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  features[0].head.mean: Invalid input: expected number, received null`,
    )
    // Values that JSON cannot hold, passed as they are.
    expect(problemOf({ ...asJson(report), timings: { train: Infinity } })).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  timings.train: Invalid input: expected number, received Infinity`,
    )
    const nanScore = asJson(report)
    nanScore.sides.head.scores[1] = NaN
    expect(problemOf(nanScore)).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  sides.head.scores[1]: Invalid input: expected number, received NaN`,
    )
  })

  it('rejects wrong types, fractional counts and seeds outside uint32', () => {
    const json = asJson(courierReport())
    json.features[0].isGroup = 'no'
    json.sides.base.trainRows = 48210.5
    json.settings.seed = 2 ** 32
    expect(problemOf(json)).toBe(
      [
        `${source} is not a valid plumbline report (schema version 1), 3 problems:`,
        '  features[0].isGroup: Invalid input: expected boolean, received string',
        '  sides.base.trainRows: Invalid input: expected int, received number',
        '  settings.seed: Too big: expected number to be <=4294967295',
      ].join('\n'),
    )
  })

  it(`rejects strings over ${reportLimits.maxTextLength} characters and arrays over ${reportLimits.maxItems} items`, () => {
    const json = asJson(courierReport())
    json.features[1].name = 'x'.repeat(2001)
    json.findings[0].message = 'y'.repeat(10_001)
    json.agreement.nullKendallTau = new Array(100_001).fill(null)
    expect(problemOf(json)).toBe(
      [
        `${source} is not a valid plumbline report (schema version 1), 3 problems:`,
        '  findings[0].message: Too big: expected string to have <=10000 characters',
        '  features[1].name: Too big: expected string to have <=2000 characters',
        '  agreement.nullKendallTau: Too big: expected array to have <=100000 items',
      ].join('\n'),
    )
  })

  it('rejects a "__proto__" key, which zod records would drop silently', () => {
    const json = asJson(courierReport())
    json.findings[0].evidence = JSON.parse('{"__proto__": {"isAdmin": true}, "dominanceShare": 0.6814}')
    expect(problemOf(json)).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  findings[0].evidence.__proto__: the key "__proto__" is not allowed`,
    )
  })

  it('shows the first five problems and counts the rest', () => {
    const json = asJson(courierReport())
    for (const row of json.features) row.presence = 'maybe'
    const message = problemOf(json)
    expect(message.split('\n')).toHaveLength(7)
    expect(message.split('\n')[1]).toBe('  features[0].presence: Invalid option: expected one of "both"|"added"|"removed"')
    expect(message.split('\n')[6]).toBe('  and 4 more')
  })

  it('quotes odd keys without their control characters, and cuts long problems', () => {
    const json = asJson(courierReport())
    json.tool[`x\n::error::${'z'.repeat(400)}`] = 1
    const [, problem] = problemOf(json).split('\n')
    expect(problem).toMatch(/^  tool: Unrecognized key: "x ::error::z+…$/)
    expect(problem.length).toBe(2 + 300 + 1)
  })

  it('names another schema version, and a value that is not a report at all', () => {
    expect(() => parseGateReport({ ...asJson(courierReport()), schemaVersion: 2 }, source)).toThrow(
      new UserError(
        `${source}: this is a plumbline report of schema version 2, and this plumbline reads version 1 only.`,
        'Write and publish the report with the same plumbline version.',
      ),
    )
    expect(problemOf([])).toBe(
      `${source} is not a valid plumbline report (schema version 1), 1 problem:\n  (top level): Invalid input: expected object, received array`,
    )
  })

  it('says how to fix it', () => {
    try {
      parseGateReport(null, source)
    } catch (error) {
      expect((error as UserError).fix).toBe(
        'Publish the report file exactly as the plumbline run wrote it, with the same plumbline version in both jobs.',
      )
    }
    expect.assertions(1)
  })
})

describe('gateReportJsonSchema()', () => {
  it('matches the committed docs/report.schema.json (rerun scripts/write-report-schema.ts)', () => {
    const committed = readFileSync(new URL('../../../docs/report.schema.json', import.meta.url), 'utf8')
    expect(committed).toBe(`${JSON.stringify(gateReportJsonSchema(), null, 2)}\n`)
  })

  it('is a closed draft 2020-12 schema that lets undefined statistics be null', () => {
    const schema = gateReportJsonSchema() as any
    expect(schema.$schema).toBe('https://json-schema.org/draft/2020-12/schema')
    expect(schema.additionalProperties).toBe(false)
    expect(schema.$defs.SideImportance.additionalProperties).toBe(false)
    expect(schema.$defs.SideImportance.properties.mean).toEqual({ type: 'number' })
    expect(schema.$defs.SideImportance.properties.lower.type).toEqual(['number', 'null'])
    expect(schema.$defs.RankAgreement.properties.kendallTau.type).toEqual(['number', 'null'])
    expect(schema.properties.verdict.enum).toEqual(['pass', 'warn', 'block', 'error'])
  })
})
