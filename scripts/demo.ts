/**
 * npm run demo: builds a throwaway git repository from sample-repo/ (the fictional courier
 * Northwind Parcel) with a base commit on main and two pull-request branches, runs
 * `plumbline check` on each, and prints both reports.
 *   add-roadworks   adds roadworks_km, known at dispatch: a real signal. Must pass or warn.
 *   add-scan-delay  adds scan_delay_h, computed from the final scan after delivery: it leaks
 *                   the label. Must block.
 * Exits 0 only when both verdicts are as expected.
 */
import { execFileSync } from 'node:child_process'
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { main } from '../src/adapters/cli/main.ts'

const here = dirname(fileURLToPath(import.meta.url))
const sample = join(here, '..', 'sample-repo')

export const branches = [
  {
    name: 'add-roadworks',
    feature: `  roadworks_km: (r) => r.roadworks_km,\n`,
    message: 'Add kilometres of road works on the route (known at dispatch)',
    expect: ['pass', 'warn'],
  },
  {
    name: 'add-scan-delay',
    feature: `  scan_delay_h: (r) => (Number(r.final_scan_hour) - Number(r.promised_by_hour)).toFixed(2),\n`,
    message: 'Add the delay of the final scan against the promised hour',
    expect: ['block'],
  },
] as const

/** Creates the demo repository and returns its path. */
export function buildDemoRepository(): string {
  const repo = mkdtempSync(join(tmpdir(), 'plumbline-demo-'))
  cpSync(sample, repo, { recursive: true, filter: (src) => !src.includes(`${join(sample, 'data')}`) })
  const run = (...args: string[]) => execFileSync('git', args, { cwd: repo, stdio: 'pipe' })
  run('init', '--quiet', '--initial-branch=main')
  run('config', 'user.email', 'demo@northwind-parcel.example')
  run('config', 'user.name', 'Northwind Parcel data team')
  run('add', '-A')
  run('commit', '--quiet', '-m', 'Late-delivery model: base features')
  const script = join(repo, 'scripts', 'build-features.mjs')
  const original = readFileSync(script, 'utf8')
  for (const branch of branches) {
    run('checkout', '--quiet', '-b', branch.name, 'main')
    writeFileSync(script, original.replace('  parcel_weight_kg: (r) => r.parcel_weight_kg,\n', (line) => line + branch.feature))
    run('commit', '--quiet', '-am', branch.message)
  }
  run('checkout', '--quiet', 'main')
  return repo
}

async function demo(): Promise<number> {
  const repo = buildDemoRepository()
  let ok = true
  try {
    for (const branch of branches) {
      process.stdout.write(`\n=== Pull request '${branch.name}': ${branch.message}\n\n`)
      const started = performance.now()
      const reportPath = join(repo, `.plumbline-${branch.name}.json`)
      const code = await main(['check', '--base', 'main', '--head', branch.name, '--json', reportPath], {
        cwd: repo,
        stdout: (text) => process.stdout.write(text),
        stderr: (text) => process.stderr.write(text),
        isTty: false,
      })
      const seconds = (performance.now() - started) / 1000
      if (code >= 2) {
        ok = false
        process.stdout.write(`\nThe check failed (exit ${code}).\n`)
        continue
      }
      const verdict = JSON.parse(readFileSync(reportPath, 'utf8')).verdict as string
      const expected = (branch.expect as readonly string[]).includes(verdict)
      ok &&= expected
      process.stdout.write(
        `\n--- ${branch.name}: ${verdict} in ${seconds.toFixed(1)} s (expected ${branch.expect.join(' or ')}: ${expected ? 'yes' : 'NO'})\n`,
      )
    }
  } finally {
    rmSync(repo, { recursive: true, force: true })
  }
  process.stdout.write(ok ? '\nDemo: both verdicts as expected.\n' : '\nDemo: a verdict was not as expected.\n')
  return ok ? 0 : 1
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  process.exitCode = await demo()
}
