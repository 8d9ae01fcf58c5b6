/**
 * npm run bench: every benchmark, each in its own process (so peak memory is its own), with the
 * reference tool run in the same command and the ratio printed. Not a test: nothing here asserts.
 */
import { spawnSync } from 'node:child_process'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'

const here = dirname(fileURLToPath(import.meta.url))
const benches = [
  ['GBDT fit against XGBoost hist', 'gbt-fit.ts'],
  ['Permutation importance against scikit-learn', 'permutation-importance.ts'],
] as const

let failed = false
for (const [title, file] of benches) {
  process.stdout.write(`\n## ${title}\n\n`)
  const run = spawnSync(process.execPath, ['--import', 'tsx', join(here, file)], { stdio: 'inherit' })
  if (run.status !== 0) {
    failed = true
    process.stdout.write(`(${file} failed with exit code ${run.status})\n`)
  }
}
process.exitCode = failed ? 1 : 0
