import type { Dataset } from '../../core/data/dataset.ts'
import { readDataset, type ReadDatasetOptions } from './read-dataset.ts'
import { readParquetDataset } from './read-parquet-dataset.ts'

/** A data file by its name: one ending in .parquet (any case) is read as Parquet, any other as CSV. */
export function readTable(path: string, options: ReadDatasetOptions = {}): Promise<Dataset> {
  return /\.parquet$/i.test(path) ? readParquetDataset(path, options) : readDataset(path, options)
}
