/**
 * npm run demo, the README's first command: the sample courier repository with a legitimate feature
 * branch and a leaking one. Runs the real check on both (about 25 s), through the CLI's default path.
 */
import { execFileSync } from 'node:child_process'
import { readFileSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { main } from '../../src/adapters/cli/main.ts'
import { parseGateReport } from '../../src/core/report/report-schema.ts'
import { branches, buildDemoRepository } from '../../scripts/demo.ts'

const repo = buildDemoRepository()
afterAll(() => rmSync(repo, { recursive: true, force: true }))

async function check(branch: string) {
  let stdout = ''
  const reportPath = join(repo, `.plumbline-${branch}.json`)
  const code = await main(['check', '--base', 'main', '--head', branch, '--json', reportPath], {
    cwd: repo,
    stdout: (t) => (stdout += t),
    stderr: () => undefined,
    isTty: false,
  })
  return { code, stdout, report: parseGateReport(JSON.parse(readFileSync(reportPath, 'utf8')), reportPath) }
}

describe('the demo (scripts/demo.ts)', () => {
  it('builds a repository with main and the two pull-request branches', () => {
    const refs = execFileSync('git', ['branch', '--format=%(refname:short)'], { cwd: repo }).toString().trim().split('\n').sort()
    expect(refs).toEqual(['add-roadworks', 'add-scan-delay', 'main'])
    expect(branches.map((b) => [b.name, [...b.expect]])).toEqual([
      ['add-roadworks', ['pass', 'warn']],
      ['add-scan-delay', ['block']],
    ])
  })

  it('passes (or warns about) the legitimate roadworks feature: exit 0', async () => {
    const { code, report } = await check('add-roadworks')
    expect(code).toBe(0)
    expect(['pass', 'warn']).toContain(report.verdict)
    expect(report.featureSet.added).toEqual(['roadworks_km'])
    expect(report.findings.filter((f) => f.severity === 'block')).toEqual([])
  })

  it('blocks the post-delivery scan delay as a leak: exit 1', async () => {
    const { code, report, stdout } = await check('add-scan-delay')
    expect(code).toBe(1)
    expect(report.verdict).toBe('block')
    expect(report.findings[0]).toMatchObject({ kind: 'leakage', severity: 'block', feature: 'scan_delay_h' })
    expect(report.headline.startsWith('Blocked: scan_delay_h, new here, alone separates the holdout')).toBe(true)
    expect(stdout.startsWith('plumbline: block\n')).toBe(true)
    const worktrees = execFileSync('git', ['worktree', 'list', '--porcelain'], { cwd: repo }).toString()
    expect(worktrees.split('\n').filter((line) => line.startsWith('worktree '))).toHaveLength(1)
  })
})
