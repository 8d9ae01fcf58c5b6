/**
 * The demo's feature builder (sample-repo/scripts/build-features.mjs) writes the same tables as CSV
 * or, with --format parquet, as Parquet (through hyparquet-writer 0.17.0); plumbline reads both into
 * the same Dataset.
 */
import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { readTable } from '../../src/adapters/files/read-table.ts'
import { schemaOf } from '../../src/core/data/parse-csv.ts'

const scripts = join(import.meta.dirname, '../../sample-repo/scripts')
const dir = mkdtempSync(join(tmpdir(), 'plumbline-build-features-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

describe('sample-repo/scripts/build-features.mjs', () => {
  it('writes train and holdout tables as CSV and as Parquet that read into the same Dataset', async () => {
    execFileSync('node', [join(scripts, 'make-deliveries.mjs')], { cwd: dir })
    execFileSync('node', [join(scripts, 'build-features.mjs')], { cwd: dir })
    execFileSync('node', [join(scripts, 'build-features.mjs'), '--format', 'parquet'], { cwd: dir })
    const options = { cwd: dir, target: 'late', task: 'binary' as const, roles: { parcel_id: 'id' as const } }
    for (const name of ['train', 'holdout']) {
      const csv = await readTable(`data/${name}.csv`, { ...options, source: name })
      const parquet = await readTable(`data/${name}.parquet`, { ...options, source: name })
      expect(parquet).toEqual(csv)
      expect(parquet.rows).toBeGreaterThan(1000)
    }
    const train = await readTable('data/train.parquet', options)
    const holdout = await readTable('data/holdout.csv', { ...options, schema: schemaOf(train) })
    expect(holdout.features).toEqual(train.features)
  })

  it('refuses an unknown format', () => {
    expect(() => execFileSync('node', [join(scripts, 'build-features.mjs'), '--format', 'xlsx'], { cwd: dir, stdio: 'pipe' })).toThrow(
      /--format must be csv or parquet, got xlsx/,
    )
  })
})
