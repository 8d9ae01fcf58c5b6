import type { GateReport } from './report.ts'
import { reportCaution } from './report.ts'

/**
 * The report of a run that failed: verdict 'error', never a pass. `message` is what the user should
 * read (describeFailure's text); `isUserError` tells a fixable input problem from a bug.
 */
export function errorReport(input: {
  readonly message: string
  readonly isUserError: boolean
  readonly toolVersion: string
  readonly policySource: string
}): GateReport {
  const firstLine = input.message.split('\n')[0]
  return {
    schemaVersion: 1,
    tool: { name: 'plumbline', version: input.toolVersion },
    verdict: 'error',
    headline: input.isUserError
      ? `No verdict: the check could not run (${firstLine.replace(/\.$/, '')}).`
      : 'No verdict: plumbline failed with an internal error (a bug; please report it).',
    findings: [
      {
        kind: 'run-error',
        severity: 'block',
        title: input.isUserError ? 'The check could not run because of a problem in the inputs.' : 'plumbline failed with an internal error.',
        message: input.message,
        evidence: { isUserError: input.isUserError },
      },
    ],
    features: [],
    featureSet: { added: [], removed: [], kindChanged: [] },
    agreement: null,
    sides: null,
    settings: {
      task: 'binary',
      target: '',
      metric: '',
      higherIsBetter: true,
      draws: 0,
      refits: 0,
      seed: 0,
      policySource: input.policySource,
      policyFrom: 'head',
      checks: {},
    },
    timings: {},
    caution: reportCaution,
  }
}
