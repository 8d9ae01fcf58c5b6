import { capAlignedHoldouts, alignHoldout } from '../data/align-holdout.ts'
import { capTableRows, type RowCapRecord } from '../data/cap-table-rows.ts'
import type { Dataset } from '../data/dataset.ts'
import { deriveSeed } from '../statistics/random.ts'
import type { SideInputs } from './gate-inputs.ts'
import type { GateSettings } from './gate-settings.ts'

/** The samples a row cap drew on one side; a role is absent when its table was within its cap. */
export interface SideRowSampling {
  readonly train?: RowCapRecord
  readonly holdout?: RowCapRecord
}

/**
 * The sides as the gate measures them: the head's holdout in the base's row order (alignHoldout),
 * then the row caps of the policy (`data.max_train_rows`, `data.max_holdout_rows`). Each cap draws
 * with a seed derived from the policy seed, the role and nothing else — deriveSeed(seed, 'row-cap',
 * 'train' | 'holdout') — the same on both sides, so two sides with the same table keep the same rows
 * (a side label in the seed would give the same table two different samples and unpair the
 * comparison). Reference rows that are the training rows or the holdout (`data.reference: train |
 * holdout`) follow their table's sample. `holdouts` are the whole aligned holdouts, for the
 * holdout-rows check: a changed row must be seen even when the sample leaves it out.
 */
export function capSideRows(inputs: { readonly base: SideInputs; readonly head: SideInputs }, settings: Pick<GateSettings, 'seed' | 'rowCaps'>) {
  const alignedHead = alignHoldout(inputs.base.holdout, inputs.head.holdout)
  const { maxTrainRows, maxHoldoutRows, reference } = settings.rowCaps
  const holdouts = capAlignedHoldouts(inputs.base.holdout, alignedHead, maxHoldoutRows, deriveSeed(settings.seed, 'row-cap', 'holdout'))
  const trainSeed = deriveSeed(settings.seed, 'row-cap', 'train')
  const capSide = (side: SideInputs, holdout: { table: Dataset; record: RowCapRecord }) => {
    const train = capTableRows(side.train, maxTrainRows, trainSeed)
    const sampling: SideRowSampling = {
      ...(train.record.sampled ? { train: train.record } : {}),
      ...(holdout.record.sampled ? { holdout: holdout.record } : {}),
    }
    const sideReference = reference === 'train' ? train.table : reference === 'holdout' ? holdout.table : side.reference
    return { inputs: { ...side, train: train.table, holdout: holdout.table, reference: sideReference }, sampling }
  }
  const base = capSide(inputs.base, holdouts.base)
  const head = capSide(inputs.head, holdouts.head)
  return {
    sides: { base: base.inputs, head: head.inputs },
    sampling: { base: base.sampling, head: head.sampling },
    holdouts: { base: inputs.base.holdout, head: alignedHead },
  }
}
