import { describe, expect, it } from 'vitest'
import { errorReport } from '../../../src/core/report/error-report.ts'
import { fitReportLimits } from '../../../src/core/report/fit-report-limits.ts'
import { parseGateReport, reportLimits } from '../../../src/core/report/report-schema.ts'
import { courierReport } from './courier-report.ts'

describe('fitReportLimits(report)', () => {
  it('cuts what the schema would refuse, so publish mode reads back an honest report', () => {
    const longName = 'n'.repeat(3000)
    const report = courierReport()
    const wide = {
      ...report,
      findings: [{ ...report.findings[0], feature: longName, evidence: Object.fromEntries(Array.from({ length: 1500 }, (_, i) => [`k${i}`, i])) }, ...report.findings.slice(1)],
      features: [{ ...report.features[0], name: longName }, ...report.features.slice(1)],
    }
    expect(() => parseGateReport(JSON.parse(JSON.stringify(wide)), 'r.json')).toThrow()
    const fitted = fitReportLimits(wide)
    const back = parseGateReport(JSON.parse(JSON.stringify(fitted)), 'r.json')
    expect(back.features[0].name).toBe(`${'n'.repeat(reportLimits.maxTextLength - 1)}…`)
    expect(Object.keys(back.findings[0].evidence)).toHaveLength(reportLimits.maxKeys)
    expect(wide.features[0].name).toBe(longName)
  })

  it('keeps a run error’s message up to its own, longer limit', () => {
    const message = `prepare failed:\n${'x'.repeat(12_000)}`
    const failed = errorReport({ message, isUserError: true, toolVersion: '0.1.0', policySource: 'plumbline.yml' })
    expect(() => parseGateReport(JSON.parse(JSON.stringify(failed)), 'r.json')).toThrow()
    const back = parseGateReport(JSON.parse(JSON.stringify(fitReportLimits(failed))), 'r.json')
    expect(back.findings[0].message).toHaveLength(reportLimits.maxMessageLength)
    expect(back.findings[0].message.endsWith('…')).toBe(true)
    expect(back.headline).toBe(failed.headline)
  })

  it('changes nothing in a report within the limits', () => {
    expect(fitReportLimits(courierReport())).toEqual(courierReport())
  })
})
