/**
 * SHA-256 digests of what a measurement depends on, for partial result files and the unit cache.
 * - A side's data: every table as read (feature names, kinds, category dictionaries, every column's
 *   doubles, the target, the ids), so a prepare step that writes the same rows gives the same digest.
 * - A partial file's inputs: the tool version, the policy text, both commits and both sides' data.
 * - A unit's cache key: the tool version, the unit's id and seed, its side's data, the measurement
 *   settings of that side (task, metric, seed, refits, draws, groups, row caps, sensitivity, slices,
 *   the built-in learner's settings) and, for a side whose model is not the built-in learner (a
 *   training command, an ONNX file), the side's commit and the policy's model section: the code that
 *   trains or the file that is the model lives in the commit.
 */
import { createHash } from 'node:crypto'
import type { Dataset, FeatureMatrix } from '../../core/data/dataset.ts'
import type { MeasureJob, SideInputs } from '../../core/run-gate.ts'
import type { InputDigests } from '../../core/gate/unit-files.ts'
import type { WorkUnit } from '../../core/gate/work-units.ts'

type Hash = ReturnType<typeof createHash>

function bytes(values: Float64Array | Uint32Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength)
}

function hashMatrix(hash: Hash, label: string, data: FeatureMatrix | Dataset | undefined) {
  if (!data) {
    hash.update(`${label}:none\n`)
    return
  }
  hash.update(`${label}:${JSON.stringify({ rows: data.rows, features: data.features })}\n`)
  for (const column of data.columns) hash.update(bytes(column))
  const full = data as Partial<Dataset>
  if (full.target) {
    hash.update(`${label}.target:${JSON.stringify({ name: full.target.name, classes: full.target.classes ?? null })}\n`)
    hash.update(bytes(full.target.values))
  }
  if (full.ids) hash.update(`${label}.ids:${JSON.stringify(full.ids)}\n`)
}

export function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex')
}

/** The digest of one side's data as read. */
export function sideDataDigest(side: Pick<SideInputs, 'train' | 'holdout' | 'reference' | 'unlabeled'>): string {
  const hash = createHash('sha256')
  hashMatrix(hash, 'train', side.train)
  hashMatrix(hash, 'holdout', side.holdout)
  hashMatrix(hash, 'reference', side.reference)
  hashMatrix(hash, 'unlabeled', side.unlabeled)
  return hash.digest('hex')
}

export function inputDigests(options: { toolVersion: string; policyText: string; base: SideInputs; head: SideInputs }): InputDigests {
  return {
    toolVersion: options.toolVersion,
    policy: sha256(options.policyText),
    base: { commit: options.base.commit, data: sideDataDigest(options.base) },
    head: { commit: options.head.commit, data: sideDataDigest(options.head) },
  }
}

/** The digest a partial file carries: of the canonical JSON of its input digests. */
export function digestOfInputs(inputs: InputDigests): string {
  return sha256(JSON.stringify(inputs))
}

/** What a side's units depend on beyond the data and settings: none for the built-in learner. */
export interface SideCacheIdentity {
  readonly data: string
  /** For a training command or an ONNX file: the commit and the policy's model section; null: built-in. */
  readonly code: { readonly commit: string; readonly model: unknown } | null
}

/**
 * The cache key of a unit, or undefined when the unit cannot be cached: a side whose model comes
 * from code in an uncommitted working tree has nothing that pins that code.
 */
export function unitCacheKey(
  toolVersion: string,
  unit: WorkUnit,
  job: MeasureJob,
  identity: SideCacheIdentity | 'uncacheable',
): string | undefined {
  if (identity === 'uncacheable') return undefined
  const { onRefit: _onRefit, metric, dropColumns: _dropColumns, concurrentFits: _concurrentFits, slices, ...options } = job.options
  const hash = createHash('sha256')
  hash.update(
    JSON.stringify({
      toolVersion,
      id: unit.id,
      kind: unit.kind,
      seed: unit.seed,
      data: identity.data,
      code: identity.code,
      options: { ...options, metric: metric.name },
      builtin: job.builtin ?? null,
      slices: (slices ?? []).map((s) => s.name),
    }),
  )
  for (const slice of slices ?? []) hash.update(bytes(slice.rows))
  return hash.digest('hex')
}
