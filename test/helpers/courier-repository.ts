/**
 * A small git repository for end-to-end runs of the action: invented parcels of the fictional
 * courier Northwind Parcel (demo data, seeded), a policy sized to run in seconds (few trees, 3
 * refits, 3 draws), a base commit on main and a head commit on a branch that adds
 * `final_scan_delay_h`, the delay of the final scan against the promise. That is only known after
 * delivery and is positive exactly when the parcel was late: a leak the gate must block.
 * The checkout is a depth-1 clone of a bare origin, as actions/checkout leaves it, so the head
 * commit is missing and the action has to `git fetch --depth=1 origin <sha>` it as on GitHub.
 */
import { execFileSync } from 'node:child_process'
import { copyFileSync, mkdirSync, mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

export interface CourierRepository {
  /** The parent folder; remove it when done. */
  readonly folder: string
  /** The shallow clone with main (the base) checked out. */
  readonly path: string
  readonly baseSha: string
  readonly headSha: string
}

export const courierPolicy = `# plumbline policy for the end-to-end tests (small and fast on purpose).
version: 1
task: binary
target: late
seed: 11
data:
  train: data/parcels.csv
  split:
    fraction: 0.3
    by: parcel_id
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
    trees: 25
    max_depth: 3
    min_rows_per_leaf: 10
importance:
  draws: 3
  refits: 3
`

function parcels(rows: number, withLeak: boolean): string {
  let state = 20260105
  const random = () => {
    // mulberry32
    state = (state + 0x6d2b79f5) | 0
    let t = Math.imul(state ^ (state >>> 15), 1 | state)
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  const normal = () => Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random())
  const header = ['parcel_id', 'distance_km', 'stop_count', 'promised_window_h', 'rain_forecast_mm', ...(withLeak ? ['final_scan_delay_h'] : []), 'late']
  const lines = [header.join(',')]
  for (let i = 0; i < rows; i++) {
    const distance = Math.exp(2.2 + 0.6 * normal())
    const stops = Math.max(1, Math.round(14 + 6 * normal()))
    const window = [2, 4, 8][Math.floor(random() * 3)]
    const rain = Math.max(0, 3 * normal() + 1)
    const logit = -1.2 + 0.04 * distance + 0.06 * (stops - 14) - 0.25 * (window - 4) + 0.12 * rain
    const late = random() < 1 / (1 + Math.exp(-logit)) ? 1 : 0
    const delay = late ? 0.3 + 2.5 * random() : -(0.2 + 3 * random())
    lines.push(
      [`P${100000 + i}`, distance.toFixed(2), stops, window, rain.toFixed(1), ...(withLeak ? [delay.toFixed(2)] : []), late].join(','),
    )
  }
  return `${lines.join('\n')}\n`
}

/**
 * The same parcels scored by a committed ONNX model, test/fixtures/onnx/tree-classifier.onnx (two
 * hand-set trees over distance_km and stop_count, labels late / on_time): no training, so the run
 * only loads the model through onnxruntime on each side. The head branch touches the policy.
 */
export const onnxPolicy = `version: 1
task: binary
target: late
seed: 3
data:
  train: data/parcels.csv
  split:
    fraction: 0.5
    by: parcel_id
  columns:
    parcel_id: id
model:
  onnx:
    path: models/late.onnx
    positive_class: late
importance:
  draws: 3
  refits: 1
`

/** Only the columns the ONNX fixture reads (distance_km, stop_count), besides the id and target. */
function onnxParcels(csv: string): string {
  return csv
    .trimEnd()
    .split('\n')
    .map((line) => {
      const cells = line.split(',')
      return [cells[0], cells[1], cells[2], cells[cells.length - 1]].join(',')
    })
    .join('\n')
    .concat('\n')
}

export function buildCourierRepository(options: { rows?: number; model?: 'builtin' | 'onnx' } = {}): CourierRepository {
  const rows = options.rows ?? 500
  const folder = mkdtempSync(join(tmpdir(), 'plumbline-e2e-'))
  const source = join(folder, 'source')
  const origin = join(folder, 'origin.git')
  const path = join(folder, 'checkout')
  const git = (cwd: string, ...args: string[]) => execFileSync('git', args, { cwd, encoding: 'utf8', stdio: 'pipe' }).trim()
  mkdirSync(join(source, 'data'), { recursive: true })
  git(source, 'init', '--quiet', '--initial-branch=main')
  git(source, 'config', 'user.email', 'data-team@northwind-parcel.example')
  git(source, 'config', 'user.name', 'Northwind Parcel data team')
  const isOnnx = options.model === 'onnx'
  writeFileSync(join(source, 'plumbline.yml'), isOnnx ? onnxPolicy : courierPolicy)
  writeFileSync(join(source, 'data', 'parcels.csv'), isOnnx ? onnxParcels(parcels(rows, false)) : parcels(rows, false))
  if (isOnnx) {
    mkdirSync(join(source, 'models'))
    copyFileSync(new URL('../fixtures/onnx/tree-classifier.onnx', import.meta.url), join(source, 'models', 'late.onnx'))
  }
  git(source, 'add', '-A')
  git(source, 'commit', '--quiet', '-m', 'Late-delivery model: dispatch-time features')
  const baseSha = git(source, 'rev-parse', 'HEAD')
  git(source, 'checkout', '--quiet', '-b', 'add-scan-delay')
  if (isOnnx) writeFileSync(join(source, 'plumbline.yml'), `${onnxPolicy}# reviewed by dispatch\n`)
  else writeFileSync(join(source, 'data', 'parcels.csv'), parcels(rows, true))
  git(source, 'commit', '--quiet', '-am', isOnnx ? 'Note the policy review' : 'Add the delay of the final scan against the promise')
  const headSha = git(source, 'rev-parse', 'HEAD')
  execFileSync('git', ['clone', '--quiet', '--bare', source, origin], { stdio: 'pipe' })
  // GitHub serves any commit by SHA; a local bare repository needs this to do the same.
  git(origin, 'config', 'uploadpack.allowAnySHA1InWant', 'true')
  // What actions/checkout leaves by default: one commit (here the base), no history.
  execFileSync('git', ['clone', '--quiet', '--depth=1', '--branch', 'main', `file://${origin}`, path], { stdio: 'pipe' })
  return { folder, path, baseSha, headSha }
}

/** A pull_request event (synchronize) of the courier's repository from add-scan-delay into main, as the runner writes it. */
export function courierPullRequestEvent(number: number, commits: Pick<CourierRepository, 'baseSha' | 'headSha'>, slug = 'northwind-parcel/late-deliveries') {
  return {
    action: 'synchronize',
    number,
    pull_request: {
      number,
      base: { ref: 'main', sha: commits.baseSha, repo: { id: 4242, full_name: slug } },
      head: { ref: 'add-scan-delay', sha: commits.headSha, repo: { full_name: slug } },
    },
    repository: { id: 4242, full_name: slug },
  }
}
