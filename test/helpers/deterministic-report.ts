import type { GateReport } from '../../src/core/report/report.ts'

/** The report as JSON without what may differ between equal runs: wall-clock timings and the cache's provenance. */
export function deterministic(report: GateReport): string {
  const { timings: _timings, cache: _cache, ...rest } = report
  return `${JSON.stringify(rest, null, 2)}\n`
}
