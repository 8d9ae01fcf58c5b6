/**
 * npm run bench: every benchmark, each in its own process (so peak memory is its own), with the
 * reference tool run in the same command and the ratio printed. Not a test: nothing here asserts.
 *
 * The benchmarks run as esbuild bundles (one file each, in a temporary folder), as dist/ ships the
 * code, not under tsx's loader, which on this machine made the same hot loops about 30% slower.
 * The fit runs at three sizes (10,000, 50,000 and 200,000 training rows) so that the cost per row
 * shows whether time grows linearly. The load average is printed before and after: on a shared
 * machine only ratios measured in the same run mean anything. The whole-check benchmark runs the CLI
 * bundle in dist/, so dist/ is rebuilt first (scripts/build.mjs, deterministic: it changes nothing
 * when dist/ is already the source's build).
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { loadavg, tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { build } from 'esbuild'

const here = dirname(fileURLToPath(import.meta.url))
const benches: readonly (readonly [string, string, readonly string[]])[] = [
  ['GBDT fit against XGBoost hist, 10,000 rows', 'gbt-fit.ts', ['10000']],
  ['GBDT fit against XGBoost hist, 50,000 rows', 'gbt-fit.ts', ['50000']],
  ['GBDT fit against XGBoost hist, 200,000 rows', 'gbt-fit.ts', ['200000']],
  ['Permutation importance against scikit-learn', 'permutation-importance.ts', []],
  ['Whole check on 50,000 rows against one XGBoost hist fit', 'whole-check.ts', ['50000']],
]

const load = () => loadavg().map((v) => v.toFixed(2)).join(' / ')
const out = mkdtempSync(join(tmpdir(), 'plumbline-bench-build-'))
let failed = false
try {
  const files = [...new Set(benches.map(([, file]) => file))]
  await build({
    entryPoints: files.map((file) => join(here, file)),
    outdir: out,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    outExtension: { '.js': '.mjs' },
    logLevel: 'error',
  })
  const rebuild = spawnSync(process.execPath, [join(here, '..', 'scripts', 'build.mjs')], { stdio: 'inherit' })
  if (rebuild.status !== 0) throw new Error('bench: scripts/build.mjs failed, so dist/ cannot be measured')
  process.stdout.write(`Load average (1 / 5 / 15 min) before: ${load()} on ${spawnSync('nproc', { encoding: 'utf8' }).stdout.trim()} cores\n`)
  for (const [title, file, args] of benches) {
    process.stdout.write(`\n## ${title}\n\n`)
    const bundle = join(out, file.replace(/\.ts$/, '.mjs'))
    const run = spawnSync(process.execPath, [bundle, ...args], { stdio: 'inherit', env: { ...process.env, PLUMBLINE_BENCH_ROOT: join(here, '..') } })
    if (run.status !== 0) {
      failed = true
      process.stdout.write(`(${file} failed with exit code ${run.status})\n`)
    }
  }
  process.stdout.write(`\nLoad average after: ${load()}\n`)
} finally {
  rmSync(out, { recursive: true, force: true })
}
process.exitCode = failed ? 1 : 0
