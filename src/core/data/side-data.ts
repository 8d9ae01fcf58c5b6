/**
 * Which tables a side uses, decided from the policy alone: the training file, then a holdout file or
 * a split of the training rows, then reference rows for permutation draws (the training rows, the
 * holdout, or a file of their own). The adapter reads the files this names, in this order, and hands
 * the tables back to assembleSideData; no policy semantics live in the adapter.
 */
import type { GateConfig } from '../config.ts'
import type { Dataset } from './dataset.ts'
import { splitRows } from './split-rows.ts'

export interface DataFileRequest {
  readonly role: 'train' | 'holdout' | 'reference' | 'unlabeled'
  /** The path as the policy writes it, relative to the side's checkout. */
  readonly path: string
  /** The policy key that names the file, for messages. */
  readonly key: string
  /** Whether the target column must be present (reference rows need none). */
  readonly requireTarget: boolean
  /** Read with the training table's schema (same columns, kinds and categories). */
  readonly conformToTrain: boolean
}

/** The files to read for one side, the training table first. */
export function sideDataFiles(config: GateConfig): DataFileRequest[] {
  const files: DataFileRequest[] = [{ role: 'train', path: config.data.train, key: 'data.train', requireTarget: true, conformToTrain: false }]
  if (config.data.holdout.kind === 'file') {
    files.push({ role: 'holdout', path: config.data.holdout.path, key: 'data.holdout', requireTarget: true, conformToTrain: true })
  }
  if (config.data.reference.kind === 'file') {
    files.push({ role: 'reference', path: config.data.reference.path, key: 'data.reference', requireTarget: false, conformToTrain: true })
  }
  // Rows without labels are read only where something measures them (prediction sensitivity).
  if (config.data.unlabeled !== undefined && config.checks.sensitivity.action !== 'off') {
    files.push({ role: 'unlabeled', path: config.data.unlabeled, key: 'data.unlabeled', requireTarget: false, conformToTrain: true })
  }
  return files
}

export interface SideData {
  readonly train: Dataset
  readonly holdout: Dataset
  readonly reference: Dataset
  /** `data.unlabeled`, when the policy names it and prediction sensitivity is on. */
  readonly unlabeled?: Dataset
}

/** The side's training rows, holdout and reference rows from the tables read for sideDataFiles. */
export function assembleSideData(config: GateConfig, tables: Readonly<Partial<Record<DataFileRequest['role'], Dataset>>>): SideData {
  const all = tables.train
  if (!all) throw new RangeError('assembleSideData needs the training table')
  let train = all
  let holdout: Dataset
  if (config.data.holdout.kind === 'split') {
    const split = splitRows(all, { fraction: config.data.holdout.fraction, seed: config.seed, by: config.data.holdout.by })
    train = split.train
    holdout = split.holdout
  } else {
    if (!tables.holdout) throw new RangeError('assembleSideData needs the holdout table the policy names')
    holdout = tables.holdout
  }
  const reference =
    config.data.reference.kind === 'train' ? train : config.data.reference.kind === 'holdout' ? holdout : tables.reference
  if (!reference) throw new RangeError('assembleSideData needs the reference table the policy names')
  return { train, holdout, reference, ...(tables.unlabeled ? { unlabeled: tables.unlabeled } : {}) }
}
