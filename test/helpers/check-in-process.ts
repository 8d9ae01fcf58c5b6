/**
 * `plumbline check --base main --head pr --json report.json --quiet` run in process (the CLI's main)
 * on a test repository, for the open-data tests: it must end with a verdict (exit 0 or 1, not a
 * user error), and the JSON report is returned.
 */
import { readFileSync } from 'node:fs'
import { expect } from 'vitest'
import { main } from '../../src/adapters/cli/main.ts'
import type { GateReport } from '../../src/core/report/report.ts'

export async function checkInProcess(root: string): Promise<GateReport> {
  const reportPath = `${root}/report.json`
  let stderr = ''
  const code = await main(['check', '--base', 'main', '--head', 'pr', '--json', reportPath, '--quiet'], {
    cwd: root,
    stdout: () => undefined,
    stderr: (t) => (stderr += t),
    isTty: false,
  })
  expect(code, stderr).toBeLessThan(2)
  return JSON.parse(readFileSync(reportPath, 'utf8')) as GateReport
}
