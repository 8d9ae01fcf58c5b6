import { mkdir, mkdtemp, rm, symlink, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { parquetWriteBuffer } from 'hyparquet-writer'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { readParquetDataset } from '../../../src/adapters/files/read-parquet-dataset.ts'
import { readTable } from '../../../src/adapters/files/read-table.ts'
import { userErrorOf } from '../../helpers/user-error-of.ts'

let root: string
let dir: string

beforeAll(async () => {
  root = await mkdtemp(join(tmpdir(), 'plumbline-read-parquet-'))
  dir = join(root, 'repo')
  await mkdir(join(dir, 'data'), { recursive: true })
  // Invented parcel-courier rows (demo scenario), written by hyparquet-writer 0.17.0.
  const bytes = parquetWriteBuffer({
    columnData: [
      { name: 'parcel_id', data: ['P1', 'P2'], type: 'STRING' },
      { name: 'distance_km', data: [4.5, null], type: 'DOUBLE' },
      { name: 'late', data: ['yes', 'no'], type: 'STRING' },
    ],
  })
  await writeFile(join(dir, 'data', 'train.parquet'), new Uint8Array(bytes))
  await writeFile(join(root, 'outside.parquet'), new Uint8Array(bytes))
  await symlink(join(root, 'outside.parquet'), join(dir, 'data', 'linked.parquet'))
  await writeFile(join(dir, 'data', 'train.csv'), 'parcel_id,distance_km,late\nP1,4.5,yes\nP2,NA,no\n', 'utf8')
})

afterAll(async () => {
  await rm(root, { recursive: true, force: true })
})

describe('readParquetDataset(path, options)', () => {
  it('reads a file relative to cwd and names it as given', async () => {
    const data = await readParquetDataset('data/train.parquet', { cwd: dir, target: 'late', roles: { parcel_id: 'id' } })
    expect(data.source).toBe('data/train.parquet')
    expect(data.ids?.values).toEqual(['P1', 'P2'])
    expect(Array.from(data.columns[0])).toEqual([4.5, NaN])
    expect(data.target?.classes).toEqual(['no', 'yes'])
  })

  it('refuses a missing file or a directory, naming the path and the directory it was resolved against', async () => {
    expect(await userErrorOf(readParquetDataset('data/holdout.parquet', { cwd: dir, target: 'late' }))).toBe(
      `Cannot read the data file 'data/holdout.parquet' (resolved against ${dir}): there is no such file. | Check the path: a relative path is read from that directory.`,
    )
    expect(await userErrorOf(readParquetDataset('data', { cwd: dir, target: 'late' }))).toBe(
      `Cannot read the data file 'data' (resolved against ${dir}): it is a directory. | Check the path: a relative path is read from that directory.`,
    )
  })

  it('refuses a path outside cwd, also through a symbolic link', async () => {
    const outside = `The data file '../outside.parquet' is outside the repository (resolved against ${dir}). | Name a file inside the repository, with a path relative to its root.`
    expect(await userErrorOf(readParquetDataset('../outside.parquet', { cwd: dir, target: 'late' }))).toBe(outside)
    expect(await userErrorOf(readParquetDataset('data/linked.parquet', { cwd: dir, target: 'late' }))).toBe(
      `The data file 'data/linked.parquet' is outside the repository (resolved against ${dir}). | Name a file inside the repository, with a path relative to its root.`,
    )
  })
})

describe('readTable(path, options)', () => {
  it('reads .parquet as Parquet and anything else as CSV, into the same Dataset', async () => {
    const options = { cwd: dir, target: 'late', roles: { parcel_id: 'id' as const }, source: 'train' }
    expect(await readTable('data/train.parquet', options)).toEqual(await readTable('data/train.csv', options))
  })
})
