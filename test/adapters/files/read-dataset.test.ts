import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { readDataset } from '../../../src/adapters/files/read-dataset.ts'
import { UserError } from '../../../src/core/errors.ts'

let dir: string

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'plumbline-read-dataset-'))
  await mkdir(join(dir, 'data'))
  // Invented parcel-courier rows (demo scenario), written with a BOM and CRLF as a spreadsheet would.
  await writeFile(join(dir, 'data', 'train.csv'), '\uFEFFparcel_id,distance_km,late\r\nP1,4.5,yes\r\nP2,NA,no\r\n', 'utf8')
})

afterAll(async () => {
  await rm(dir, { recursive: true, force: true })
})

async function userErrorOf(promise: Promise<unknown>): Promise<string> {
  const error = await promise.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(error instanceof UserError)) throw new Error(`expected a UserError, got ${String(error)}`)
  return `${error.message} | ${error.fix}`
}

describe('readDataset(path, options)', () => {
  it('reads a file relative to cwd and names it as given', async () => {
    const data = await readDataset('data/train.csv', { cwd: dir, target: 'late', roles: { parcel_id: 'id' } })
    expect(data.source).toBe('data/train.csv')
    expect(data.ids?.values).toEqual(['P1', 'P2'])
    expect(Array.from(data.columns[0])).toEqual([4.5, NaN])
    expect(data.target?.classes).toEqual(['no', 'yes'])
  })

  it('uses the source option for messages when given', async () => {
    const data = await readDataset(join(dir, 'data', 'train.csv'), { source: 'train', target: 'late' })
    expect(data.source).toBe('train')
  })

  it('passes parse errors on with the path as given', async () => {
    expect(await userErrorOf(readDataset('data/train.csv', { cwd: dir, target: 'on_time' }))).toBe(
      "data/train.csv has no target column 'on_time'. Its columns are 'parcel_id', 'distance_km', 'late'. | Add the column 'on_time' to the file, or name one of its columns as the target.",
    )
  })

  it('refuses a missing file or a directory, naming the path and the directory it was resolved against', async () => {
    expect(await userErrorOf(readDataset('data/holdout.csv', { cwd: dir, target: 'late' }))).toBe(
      `Cannot read the data file 'data/holdout.csv' (resolved against ${dir}): there is no such file. | Check the path: a relative path is read from that directory.`,
    )
    expect(await userErrorOf(readDataset('data', { cwd: dir, target: 'late' }))).toBe(
      `Cannot read the data file 'data' (resolved against ${dir}): it is a directory. | Check the path: a relative path is read from that directory.`,
    )
  })
})
