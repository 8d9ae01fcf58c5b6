/**
 * The files work-unit results travel in: a shard's partial result file (`plumbline shard`, read
 * back by `plumbline shard --after` and `plumbline merge`) and one cache entry per unit (`--cache`).
 * Both are versioned JSON read through strict zod schemas: unknown keys, other versions and wrong
 * types are refused with a message naming the file and the key.
 *
 * Numbers must come back bit for bit, so that a merged report equals a single-machine one: JSON
 * writes a finite double as its shortest round-tripping decimal (ECMA-262 Number::toString), which
 * parses back to the same double; NaN, ±Infinity and -0, which JSON cannot hold, are written as
 * the strings "NaN", "Infinity", "-Infinity" and "-0".
 */
import { z } from 'zod'

import { UserError } from '../errors.ts'
import type { RefitMeasurement } from '../measure-side.ts'
import type { UnitResult, UnitStage, WorkUnit } from './work-units.ts'

export const partialFormat = { format: 'plumbline-partial', version: 1 } as const
export const cacheFormat = { format: 'plumbline-unit', version: 1 } as const

/** What a partial file's inputs digest covers, each part's SHA-256, so a mismatch can say which part differs. */
export interface InputDigests {
  readonly toolVersion: string
  readonly policy: string
  readonly base: { readonly commit: string | null; readonly data: string }
  readonly head: { readonly commit: string | null; readonly data: string }
}

export interface PartialFile {
  readonly format: typeof partialFormat.format
  readonly version: typeof partialFormat.version
  /** SHA-256 of `inputs` (as canonical JSON). */
  readonly digest: string
  readonly inputs: InputDigests
  readonly shard: { readonly stage: UnitStage; readonly index: number; readonly of: number }
  readonly units: readonly EncodedUnit[]
}

type Encoded = number | 'NaN' | 'Infinity' | '-Infinity' | '-0'

export interface EncodedUnit {
  readonly id: string
  readonly kind: WorkUnit['kind']
  readonly side: 'base' | 'head'
  readonly refit: number
  readonly seed: number
  readonly feature?: string
  /** A drop-group unit's group and its members. */
  readonly group?: string
  readonly members?: readonly string[]
  readonly result: unknown
}

function encodeNumber(x: number): Encoded {
  if (Number.isNaN(x)) return 'NaN'
  if (x === Infinity) return 'Infinity'
  if (x === -Infinity) return '-Infinity'
  if (Object.is(x, -0)) return '-0'
  return x
}

/** A unit's result as plain JSON: every number through encodeNumber, typed arrays as arrays. */
export function encodeUnitResult(result: UnitResult): unknown {
  const walk = (value: unknown): unknown => {
    if (typeof value === 'number') return encodeNumber(value)
    if (value instanceof Float64Array) return Array.from(value, encodeNumber)
    if (Array.isArray(value)) return value.map(walk)
    if (value && typeof value === 'object') {
      const out: Record<string, unknown> = {}
      for (const [k, v] of Object.entries(value)) if (v !== undefined) out[k] = walk(v)
      return out
    }
    return value
  }
  return result.kind === 'refit' ? { refit: walk(result.part) } : { score: encodeNumber(result.score) }
}

export function encodeUnit(unit: WorkUnit, result: UnitResult): EncodedUnit {
  return {
    id: unit.id,
    kind: unit.kind,
    side: unit.side,
    refit: unit.refit,
    seed: unit.seed,
    ...(unit.kind === 'drop-column' ? { feature: unit.feature } : {}),
    ...(unit.kind === 'drop-group' ? { group: unit.group, members: unit.members } : {}),
    result: encodeUnitResult(result),
  }
}

const maxItems = 10_000_000
const text = z.string().max(100_000)
const list = <T extends z.ZodType>(item: T) => z.array(item).max(maxItems)
const number = z.union([z.number(), z.enum(['NaN', 'Infinity', '-Infinity', '-0'])]).transform((x) => (typeof x === 'number' ? x : x === '-0' ? -0 : Number(x)))
const sha256 = z.string().regex(/^[0-9a-f]{64}$/, 'a SHA-256 in hex (64 characters 0-9, a-f)')
const side = z.enum(['base', 'head'])
const index = z.int().min(0)

// Shapes in the order the core builds these objects, so that a decoded part serializes as the original.
const importance = z.strictObject({
  name: text,
  members: list(text),
  isGroup: z.boolean(),
  draws: list(number),
  mean: number,
  sd: number,
  lower: number,
  upper: number,
  rowSe: number.optional(),
})
const sensitivity = z.strictObject({
  name: text,
  members: list(text),
  isGroup: z.boolean(),
  draws: list(number),
  mean: number,
  flipDraws: list(number).optional(),
  flipShare: number.optional(),
})
const refitPart = z.strictObject({
  score: number,
  separation: number,
  importances: list(importance),
  predictions: list(number).transform((values) => Float64Array.from(values)),
  model: z.strictObject({ kind: text, featureNames: list(text), engine: z.enum(['plumbline-trees', 'plumbline-linear', 'onnxruntime']) }),
  slices: list(z.strictObject({ score: number, importances: list(importance) })),
  splitStatistics: list(z.strictObject({ feature: text, gain: number, splits: number })).optional(),
  sensitivity: z.strictObject({ holdout: list(sensitivity), unlabeled: list(sensitivity).optional() }).optional(),
})
const refitResult = z.strictObject({ refit: refitPart })
const dropResult = z.strictObject({ score: number })

const unitSchema = z.discriminatedUnion('kind', [
  z.strictObject({ id: text, kind: z.literal('refit'), side, refit: index, seed: index, result: refitResult }),
  z.strictObject({ id: text, kind: z.literal('drop-column'), side, refit: index, seed: index, feature: text, result: dropResult }),
  z.strictObject({ id: text, kind: z.literal('drop-group'), side, refit: index, seed: index, group: text, members: list(text), result: dropResult }),
])

const sideDigest = z.strictObject({ commit: z.string().regex(/^[0-9a-f]{40}([0-9a-f]{24})?$/).nullable(), data: sha256 })
export const inputDigestsSchema = z.strictObject({ toolVersion: text, policy: sha256, base: sideDigest, head: sideDigest })

const partialSchema = z.strictObject({
  format: z.literal(partialFormat.format),
  version: z.literal(partialFormat.version),
  digest: sha256,
  inputs: inputDigestsSchema,
  shard: z.strictObject({ stage: z.enum(['refits', 'drop-columns']), index: z.int().min(1), of: z.int().min(1) }),
  units: list(unitSchema),
})

const cacheSchema = z.strictObject({
  format: z.literal(cacheFormat.format),
  version: z.literal(cacheFormat.version),
  key: sha256,
  id: text,
  result: z.union([refitResult, dropResult]),
})

/** A decoded unit: what it is and its result, as the executors return it. */
export interface DecodedUnit extends Omit<EncodedUnit, 'result'> {
  readonly result: UnitResult
}

export interface DecodedPartial extends Omit<PartialFile, 'units'> {
  readonly units: readonly DecodedUnit[]
}

function toResult(result: z.infer<typeof refitResult> | z.infer<typeof dropResult>): UnitResult {
  return 'refit' in result ? { kind: 'refit', part: result.refit as unknown as RefitMeasurement } : { kind: 'drop-column', score: result.score }
}

function describeIssue(issue: z.core.$ZodIssue): string {
  const path = issue.path.length > 0 ? issue.path.map(String).join('.') : '(the top level)'
  return `${path}: ${issue.message}`
}

/** Reads a partial file's text; `source` names it in messages. A malformed file is a UserError. */
export function readPartialFile(textContent: string, source: string): DecodedPartial {
  const parsed = parseJson(textContent, source, 'a partial result file written by plumbline shard')
  const format = (parsed as { format?: unknown } | null)?.format
  const version = (parsed as { version?: unknown } | null)?.version
  if (format !== partialFormat.format) {
    throw new UserError(`${source} is not a plumbline partial result file (its "format" is ${JSON.stringify(format ?? null)}, not "${partialFormat.format}").`, 'Pass the folders plumbline shard --out wrote, and nothing else.')
  }
  if (version !== partialFormat.version) {
    throw new UserError(
      `${source} is a partial result file of version ${JSON.stringify(version ?? null)}; this plumbline reads version ${partialFormat.version}.`,
      'Run the shards and the merge with the same plumbline version.',
    )
  }
  const result = partialSchema.safeParse(parsed)
  if (!result.success) {
    throw new UserError(`${source} is not a valid partial result file: ${describeIssue(result.error.issues[0])}.`, 'Run plumbline shard again to rewrite it; partial files are not meant to be edited.')
  }
  const file = result.data
  return {
    ...file,
    units: file.units.map((u) => ({
      id: u.id,
      kind: u.kind,
      side: u.side,
      refit: u.refit,
      seed: u.seed,
      ...('feature' in u ? { feature: u.feature } : {}),
      ...('group' in u ? { group: u.group, members: u.members } : {}),
      result: toResult(u.result),
    })),
  }
}

/** A cache entry's text, or undefined when it is unreadable or not for `key` and `id` (then it is never used). */
export function readCacheEntry(textContent: string, key: string, id: string): UnitResult | undefined {
  let parsed: unknown
  try {
    parsed = JSON.parse(textContent)
  } catch {
    return undefined
  }
  const result = cacheSchema.safeParse(parsed)
  if (!result.success || result.data.key !== key || result.data.id !== id) return undefined
  return toResult(result.data.result)
}

export function cacheEntryText(key: string, unit: WorkUnit, result: UnitResult): string {
  return `${JSON.stringify({ ...cacheFormat, key, id: unit.id, result: encodeUnitResult(result) })}\n`
}

function parseJson(textContent: string, source: string, what: string): unknown {
  try {
    return JSON.parse(textContent)
  } catch (error) {
    throw new UserError(`${source} is not JSON (${(error as Error).message}).`, `Pass ${what}.`)
  }
}
