/**
 * Measures sharding and the unit cache on the demo repository (npm run demo's), each step a
 * separate process of the CLI from source, as CI jobs would be:
 * - wall time of `check` on one process, and of plan + N shard processes per stage run at once +
 *   merge, for N = 1, 2, 4 (every process with PLUMBLINE_THREADS=1: one core a simulated machine);
 * - the cache: a check with --cache on a pull request, then a second push to it (the head changes,
 *   the base does not) checked with the same cache folder, against that push checked without one.
 * Run: node --import tsx scripts/measure-shards.ts   (prints a markdown table; nothing is written)
 */
import { execFileSync, spawn } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { cpus, tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { buildDemoRepository } from './demo.ts'

const root = join(dirname(fileURLToPath(import.meta.url)), '..')
const cli = join(root, 'src', 'adapters', 'cli', 'index.ts')
const loader = pathToFileURL(join(root, 'node_modules', 'tsx', 'dist', 'loader.mjs')).href

function plumbline(args: string[], cwd: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', loader, cli, ...args], { cwd, env: { ...process.env, PLUMBLINE_THREADS: '1' } })
    let stdout = ''
    let stderr = ''
    child.stdout.on('data', (d) => (stdout += d))
    child.stderr.on('data', (d) => (stderr += d))
    child.on('close', (code) => resolve({ code: code ?? -1, stdout, stderr }))
  })
}

async function timed<T>(body: () => Promise<T>): Promise<[number, T]> {
  const started = performance.now()
  const value = await body()
  return [(performance.now() - started) / 1000, value]
}

function must(run: { code: number; stderr: string }, what: string) {
  if (run.code !== 0 && run.code !== 1) throw new Error(`${what} failed (${run.code}):\n${run.stderr}`)
}

const repo = buildDemoRepository()
const scratch = mkdtempSync(join(tmpdir(), 'plumbline-measure-'))
const sides = ['--base', 'main', '--head', 'add-scan-delay']
try {
  const rows: string[] = []
  const [single, check] = await timed(() => plumbline(['check', ...sides, '--json', join(scratch, 'single.json')], repo))
  must(check, 'check')
  rows.push(`| check, one process | 1 | ${single.toFixed(1)} | – | – | – | 1.00 |`)
  const reference = JSON.parse(readFileSync(join(scratch, 'single.json'), 'utf8'))
  for (const shards of [1, 2, 4]) {
    const refits = join(scratch, `refits-${shards}`)
    const drops = join(scratch, `drops-${shards}`)
    const indices = Array.from({ length: shards }, (_, i) => String(i + 1))
    const [planSeconds, plan] = await timed(() => plumbline(['plan', ...sides, '--shards', String(shards)], repo))
    must(plan, 'plan')
    const [stage1, runs1] = await timed(() => Promise.all(indices.map((i) => plumbline(['shard', ...sides, '--index', i, '--of', String(shards), '--out', refits], repo))))
    runs1.forEach((r) => must(r, 'shard'))
    const [stage2, runs2] = await timed(() => Promise.all(indices.map((i) => plumbline(['shard', ...sides, '--index', i, '--of', String(shards), '--out', drops, '--after', refits], repo))))
    runs2.forEach((r) => must(r, 'shard --after'))
    const [mergeSeconds, merge] = await timed(() => plumbline(['merge', ...sides, refits, drops, '--json', join(scratch, `merged-${shards}.json`)], repo))
    must(merge, 'merge')
    const merged = JSON.parse(readFileSync(join(scratch, `merged-${shards}.json`), 'utf8'))
    const same = JSON.stringify({ ...merged, timings: {} }) === JSON.stringify({ ...reference, timings: {} })
    if (!same) throw new Error(`the merged report of ${shards} shards differs from the check's`)
    const total = planSeconds + stage1 + stage2 + mergeSeconds
    rows.push(`| plan + shards + merge | ${shards} | ${total.toFixed(1)} | ${stage1.toFixed(1)} | ${stage2.toFixed(1)} | ${(planSeconds + mergeSeconds).toFixed(1)} | ${(single / total).toFixed(2)} |`)
  }
  console.log(`Demo pull request add-scan-delay, ${cpus().length} cores (${cpus()[0]?.model ?? 'unknown'}), every process PLUMBLINE_THREADS=1; merged reports equal the check's apart from timings.\n`)
  console.log('| run | shards | wall s | refits stage s | drop-columns stage s | plan + merge s | speed-up |\n| --- | ---: | ---: | ---: | ---: | ---: | ---: |')
  console.log(rows.join('\n'))

  // The cache: first push cold, second push (a new head commit) with the same folder, against no cache.
  const cache = join(scratch, 'cache')
  const [cold, first] = await timed(() => plumbline(['check', '--base', 'main', '--head', 'add-roadworks', '--cache', cache, '--json', join(scratch, 'first.json')], repo))
  must(first, 'first push')
  execFileSync('git', ['checkout', '--quiet', 'add-roadworks'], { cwd: repo })
  const script = join(repo, 'scripts', 'build-features.mjs')
  writeFileSync(script, readFileSync(script, 'utf8').replace('  roadworks_km: (r) => r.roadworks_km,\n', '  roadworks_km: (r) => (Number(r.roadworks_km) * 1000).toFixed(0),\n'))
  execFileSync('git', ['commit', '--quiet', '-am', 'Road works in metres'], { cwd: repo })
  execFileSync('git', ['checkout', '--quiet', 'main'], { cwd: repo })
  const [warm, second] = await timed(() => plumbline(['check', '--base', 'main', '--head', 'add-roadworks', '--cache', cache, '--json', join(scratch, 'second.json')], repo))
  must(second, 'second push')
  const [afresh, none] = await timed(() => plumbline(['check', '--base', 'main', '--head', 'add-roadworks'], repo))
  must(none, 'second push without a cache')
  const used = JSON.parse(readFileSync(join(scratch, 'second.json'), 'utf8')).cache
  console.log(`\n| demo push (add-roadworks) | wall s | units from the cache |\n| --- | ---: | ---: |`)
  console.log(`| first push, empty cache | ${cold.toFixed(1)} | 0 |`)
  console.log(`| second push, same cache | ${warm.toFixed(1)} | ${used.reused.length} of ${used.reused.length + used.measured.length + used.uncacheable.length} |`)
  console.log(`| second push, no cache | ${afresh.toFixed(1)} | – |`)
} finally {
  rmSync(repo, { recursive: true, force: true })
  rmSync(scratch, { recursive: true, force: true })
}
