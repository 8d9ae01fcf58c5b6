/**
 * Small generated git repositories for end-to-end tests of `plumbline check`: invented parcels of
 * the fictional courier Northwind Parcel (demo data only), a policy, a base commit on `main` and a
 * head commit on the branch `pr`.
 */
import { execFileSync } from 'node:child_process'
import { mkdirSync, mkdtempSync, realpathSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { createRandom } from '../../src/core/statistics/random.ts'

/** One invented parcel; `late` is drawn from a logistic model of the dispatch-time columns. */
export interface Parcel {
  readonly parcel_id: string
  readonly distance_km: number
  readonly stop_count: number
  readonly promised_window_h: number
  readonly rain_forecast_mm: number
  readonly parcel_weight_kg: number
  readonly late: 0 | 1
  /** Known only after delivery: how late the final scan was against the promise (leaks `late`). */
  readonly scan_delay_h: number
}

/**
 * `rows` parcels from a seeded generator. Distance is the strongest signal, then stop count and the
 * promised window; rain is weak; parcel weight does not enter the label at all.
 */
export function makeParcels(rows: number, seed: number, firstId = 100000): Parcel[] {
  const random = createRandom(seed)
  const parcels: Parcel[] = []
  for (let i = 0; i < rows; i++) {
    const distance = Math.exp(2.2 + 0.6 * random.normal())
    const stops = Math.max(1, Math.round(14 + 6 * random.normal()))
    const window = [2, 4, 8][random.int(3)]
    const rain = Math.max(0, 3 * random.normal() + 1)
    const weight = Math.max(0.2, Math.exp(0.8 + 0.9 * random.normal()))
    const logit = -1.2 + 0.12 * (distance - 10) + 0.08 * (stops - 14) - 0.3 * (window - 4) + 0.08 * rain
    const late = random.next() < 1 / (1 + Math.exp(-logit)) ? 1 : 0
    const delay = late ? 0.3 + 2.5 * random.next() : -(0.2 + 3 * random.next())
    parcels.push({
      parcel_id: `P${firstId + i}`,
      distance_km: round(distance, 2),
      stop_count: stops,
      promised_window_h: window,
      rain_forecast_mm: round(rain, 1),
      parcel_weight_kg: round(weight, 2),
      late,
      scan_delay_h: round(delay, 2),
    })
  }
  return parcels
}

export const dispatchColumns = ['parcel_id', 'distance_km', 'stop_count', 'promised_window_h', 'rain_forecast_mm', 'parcel_weight_kg'] as const

/** CSV text of the parcels with these columns, then `late`. */
export function parcelsCsv(parcels: readonly Parcel[], columns: readonly (keyof Parcel)[] = dispatchColumns): string {
  const header = [...columns, 'late']
  return `${header.join(',')}\n${parcels.map((p) => header.map((c) => p[c as keyof Parcel]).join(',')).join('\n')}\n`
}

/** A policy for the generated data, small enough that one check takes a few seconds. */
export function smallPolicy(overrides: { seed?: number; extra?: string } = {}): string {
  return `# plumbline policy for a generated test repository
version: 1
task: binary
target: late
seed: ${overrides.seed ?? 7}
data:
  train: data/train.csv
  holdout: data/holdout.csv
  columns:
    parcel_id: id
model:
  builtin:
    learner: gradient-boosting
    trees: 60
    max_depth: 3
importance:
  draws: 3
  refits: 3
${overrides.extra ?? ''}`
}

/** The usual base: 1200 training and 300 holdout parcels with the dispatch-time columns, and the policy. */
export function baseFiles(options: { columns?: readonly (keyof Parcel)[]; policy?: string } = {}): Record<string, string> {
  const { train, holdout } = standardParcels()
  return {
    'plumbline.yml': options.policy ?? smallPolicy(),
    'data/train.csv': parcelsCsv(train, options.columns),
    'data/holdout.csv': parcelsCsv(holdout, options.columns),
    'README.md': '# Late-delivery model (generated for a test)\n',
  }
}

export function standardParcels(): { train: Parcel[]; holdout: Parcel[] } {
  const all = makeParcels(1500, 20261201)
  return { train: all.slice(0, 1200), holdout: all.slice(1200) }
}

export interface TestRepository {
  readonly root: string
  readonly baseCommit: string
  readonly headCommit: string
  /** Runs git in the repository and returns its trimmed stdout. */
  git(...args: string[]): string
  remove(): void
}

/**
 * A new repository in a temporary folder: `base` committed on main, then `head` (path -> new text,
 * or null to delete the file) committed on the branch `pr`, which stays checked out unless
 * `checkout` says otherwise.
 */
export function makeRepository(options: {
  readonly base: Readonly<Record<string, string>>
  readonly head?: Readonly<Record<string, string | null>>
  readonly checkout?: 'main' | 'pr'
}): TestRepository {
  const root = realpathSync(mkdtempSync(join(tmpdir(), 'plumbline-test-repo-')))
  const git = (...args: string[]) => execFileSync('git', args, { cwd: root, stdio: 'pipe' }).toString('utf8').trim()
  const write = (files: Readonly<Record<string, string | null>>) => {
    for (const [path, text] of Object.entries(files)) {
      const full = join(root, path)
      if (text === null) rmSync(full, { force: true })
      else {
        mkdirSync(dirname(full), { recursive: true })
        writeFileSync(full, text)
      }
    }
  }
  git('init', '--quiet', '--initial-branch=main')
  git('config', 'user.email', 'tests@northwind-parcel.example')
  git('config', 'user.name', 'plumbline tests')
  git('config', 'commit.gpgsign', 'false')
  write(options.base)
  git('add', '-A')
  git('commit', '--quiet', '-m', 'base')
  const baseCommit = git('rev-parse', 'HEAD')
  git('checkout', '--quiet', '-b', 'pr')
  write(options.head ?? { 'README.md': '# Late-delivery model (generated for a test)\n\nA change that touches no data.\n' })
  git('add', '-A')
  git('commit', '--quiet', '--allow-empty', '-m', 'head')
  const headCommit = git('rev-parse', 'HEAD')
  if ((options.checkout ?? 'pr') === 'main') git('checkout', '--quiet', 'main')
  return { root, baseCommit, headCommit, git, remove: () => rmSync(root, { recursive: true, force: true }) }
}

function round(value: number, digits: number): number {
  return Number(value.toFixed(digits))
}
