import type { GateReport } from './report.ts'
import { reportLimits } from './report-schema.ts'

/**
 * The report cut to what parseGateReport accepts, so that publish mode reads back every report
 * plumbline writes (a 3,000-character column name, a run error's 12,000-character message): a longer
 * string ends in "…" at its limit (a finding's `message`: maxMessageLength, any other string:
 * maxTextLength), a longer list keeps its first maxItems entries, a record its first maxKeys keys
 * (each key cut to maxKeyLength). Pure; the input is not changed. Cost: one walk over the report.
 */
export function fitReportLimits(report: GateReport): GateReport {
  return fit(report, null) as GateReport
}

function cut(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`
}

function fit(value: unknown, key: string | null): unknown {
  if (typeof value === 'string') return cut(value, key === 'message' ? reportLimits.maxMessageLength : reportLimits.maxTextLength)
  if (Array.isArray(value)) return value.slice(0, reportLimits.maxItems).map((item) => fit(item, null))
  if (value === null || typeof value !== 'object' || ArrayBuffer.isView(value)) return value
  const out: Record<string, unknown> = {}
  for (const [name, item] of Object.entries(value).slice(0, reportLimits.maxKeys)) out[cut(name, reportLimits.maxKeyLength)] = fit(item, name)
  return out
}
