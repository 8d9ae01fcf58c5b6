/**
 * The GateReport JSON contract as a zod schema, and the strict reader the publish-only mode uses for
 * a report uploaded by another (possibly untrusted) job. docs/report-json.md explains every field;
 * docs/report.schema.json is `gateReportJsonSchema()` written out by scripts/write-report-schema.ts.
 *
 * Strict: objects reject unknown keys, enums reject other strings, numbers must be finite (zod 4's
 * z.number() refuses NaN and ±Infinity). JSON has no NaN, and JSON.stringify writes NaN and
 * ±Infinity as null, so the statistics that can be undefined (an interval from one refit, Kendall's
 * tau-b of a constant ranking, a p-value of two constant samples) may be null; they read back as
 * NaN, the report's in-memory "undefined". Every other number must be present and finite.
 * Sizes are capped so that a crafted file cannot make the comment or the process huge: see
 * `reportLimits`.
 */
import { z } from 'zod'

import { UserError } from '../errors.ts'
import { escapePlainText } from './escape.ts'
import type { GateReport } from './report.ts'

export const reportLimits = {
  /** Feature and group names, titles, headline, refs, descriptions, every short string. */
  maxTextLength: 2_000,
  /** A finding's message: a run error's message may carry a stack trace. */
  maxMessageLength: 10_000,
  /** Any array: features, findings, per-refit values, the reseed null. */
  maxItems: 100_000,
  /** Keys of one record (evidence, checks, one check's settings, timings). */
  maxKeys: 1_000,
  maxKeyLength: 200,
} as const

const text = z.string().max(reportLimits.maxTextLength)
const finite = z.number()
/** A statistic that may be undefined: null in JSON, NaN once read. */
const undefinedNumber = z
  .number()
  .nullable()
  .transform((value) => value ?? NaN)
  .meta({ description: 'null when the statistic is undefined; read as NaN' })
const count = z.int().min(0)
const uint32 = z.int().min(0).max(0xffff_ffff)
const list = <T extends z.ZodType>(item: T) => z.array(item).max(reportLimits.maxItems)
/**
 * JSON.parse makes "__proto__" an ordinary own key. zod's records drop it silently and its strict
 * objects report it as unknown; parseGateReport refuses it anywhere (see findPrototypeKey), and the
 * JSON Schema says so for records.
 */
const recordKey = z.string().max(reportLimits.maxKeyLength).meta({ not: { const: '__proto__' } })
const record = <T extends z.ZodType>(value: T) =>
  z
    .record(recordKey, value)
    .refine((entries) => Object.keys(entries).length <= reportLimits.maxKeys, {
      message: `at most ${reportLimits.maxKeys} keys are allowed`,
    })
    .meta({ maxProperties: reportLimits.maxKeys })

const evidenceSchema = record(z.union([finite, text, z.boolean(), z.null()])).meta({ id: 'Evidence' })

const findingSchema = z.strictObject({
  kind: z.enum([
    'leakage',
    'rank-shift',
    'rank-agreement',
    'score-regression',
    'holdout-rows',
    'feature-set',
    'floor-drop',
    'share-redistribution',
    'unused-feature',
    'policy-changed',
    'noise-model',
    'run-error',
    'sensitivity-shift',
    'sensitivity-unlabeled',
    'gain-noise',
    'slice-score',
    'slice-dominance',
    'slice-top-features',
    'slice-too-small',
    'group-carried',
  ]),
  severity: z.enum(['block', 'warn', 'info']),
  feature: text.optional(),
  title: text,
  message: z.string().max(reportLimits.maxMessageLength),
  evidence: evidenceSchema,
}).meta({ id: 'Finding' })

const sideImportanceSchema = z.strictObject({
  mean: finite,
  lower: undefinedNumber,
  upper: undefinedNumber,
  refitSd: undefinedNumber,
  drawSd: undefinedNumber,
  rank: z.int().min(1),
  share: undefinedNumber,
  isAboveFloor: z.boolean(),
  perRefit: list(finite),
  singleFeatureScore: undefinedNumber.optional(),
  dropColumn: z.strictObject({
    loss: finite,
    lower: undefinedNumber,
    upper: undefinedNumber,
    pValue: undefinedNumber,
    isAboveNoise: z.boolean(),
    perRefit: list(finite),
  }).optional(),
}).meta({ id: 'SideImportance' })

const featureRowSchema = z.strictObject({
  name: text,
  isGroup: z.boolean(),
  members: list(text).optional(),
  presence: z.enum(['both', 'added', 'removed']),
  kind: z.enum(['numeric', 'categorical', 'group']).optional(),
  base: sideImportanceSchema.optional(),
  head: sideImportanceSchema.optional(),
  shift: z
    .strictObject({
      meanDifference: finite,
      welchT: undefinedNumber,
      welchDf: undefinedNumber,
      pValue: undefinedNumber,
      adjustedPValue: undefinedNumber,
      isSignificant: z.boolean(),
      positionsMoved: z.int().nullable(),
    })
    .optional(),
}).meta({ id: 'FeatureRow' })

const rowSampleSchema = z.strictObject({ rows: count, kept: count, seed: uint32 }).meta({ id: 'RowSample' })

const sideSummarySchema = z.strictObject({
  side: z.enum(['base', 'head']),
  ref: text,
  commit: text.nullable(),
  trainRows: count,
  holdoutRows: count,
  evaluationRows: count,
  referenceRows: count,
  features: list(z.strictObject({ name: text, kind: z.enum(['numeric', 'categorical']) })),
  model: z.strictObject({ kind: text, description: text, engine: z.enum(['plumbline-trees', 'plumbline-linear', 'onnxruntime']).optional() }),
  scores: list(finite),
  scoreMean: finite,
  scoreSd: undefinedNumber,
  refitSeeds: list(uint32),
  noiseCovers: z.enum(['refits-and-draws', 'draws-only']),
  rowSampling: z.strictObject({ train: rowSampleSchema.optional(), holdout: rowSampleSchema.optional() }).optional(),
}).meta({ id: 'SideSummary' })

const rankAgreementSchema = z.strictObject({
  kendallTau: undefinedNumber,
  rankBiasedOverlap: undefinedNumber,
  persistence: finite,
  nullKendallTau: list(undefinedNumber),
  nullRankBiasedOverlap: list(undefinedNumber),
  kendallTauThreshold: undefinedNumber,
  rankBiasedOverlapThreshold: undefinedNumber,
  featuresCompared: count,
}).meta({ id: 'RankAgreement' })

const sensitivityValueSchema = z.strictObject({
  mean: finite,
  refitSd: undefinedNumber,
  flipShare: finite.nullable(),
  perRefit: list(finite),
}).meta({ id: 'SensitivityValue' })

const sensitivitySideSchema = z.strictObject({ holdout: sensitivityValueSchema, unlabeled: sensitivityValueSchema.optional() })

const sensitivityReportSchema = z.strictObject({
  threshold: finite.nullable(),
  decision: z.literal('most-probable-class').optional(),
  unlabeledRows: z.strictObject({ base: count, head: count }),
  features: list(
    z.strictObject({
      name: text,
      isGroup: z.boolean(),
      base: sensitivitySideSchema.optional(),
      head: sensitivitySideSchema.optional(),
      change: z.strictObject({ pValue: undefinedNumber, adjustedPValue: undefinedNumber, isSignificant: z.boolean() }).optional(),
    }),
  ),
}).meta({ id: 'SensitivityReport' })

const gainValueSchema = z.strictObject({ gain: finite, splits: finite, share: undefinedNumber, rank: z.int().min(1) })

const gainReportSchema = z.strictObject({
  caution: text,
  features: list(z.strictObject({ name: text, base: gainValueSchema.optional(), head: gainValueSchema.optional() })),
}).meta({ id: 'GainReport' })

const sliceSideSchema = z.strictObject({
  rows: count,
  scores: list(undefinedNumber),
  scoreMean: undefinedNumber,
  top: list(z.strictObject({ name: text, mean: finite, share: undefinedNumber, isAboveFloor: z.boolean() })),
})

const sliceRowSchema = z.strictObject({
  name: text,
  definition: text,
  status: z.enum(['measured', 'too-small', 'one-class']),
  rows: z.strictObject({ base: count.nullable(), head: count }),
  base: sliceSideSchema.optional(),
  head: sliceSideSchema.optional(),
  scoreChange: z.strictObject({ worsening: finite, pValue: undefinedNumber, adjustedPValue: undefinedNumber }).optional(),
}).meta({ id: 'SliceRow' })

export const gateReportSchema = z
  .strictObject({
    schemaVersion: z.literal(1),
    tool: z.strictObject({ name: z.literal('plumbline'), version: text }),
    verdict: z.enum(['pass', 'warn', 'block', 'error']),
    headline: text,
    findings: list(findingSchema),
    features: list(featureRowSchema),
    featureSet: z.strictObject({
      added: list(text),
      removed: list(text),
      kindChanged: list(z.strictObject({ name: text, base: text, head: text })),
    }),
    agreement: rankAgreementSchema.nullable(),
    sides: z.strictObject({ base: sideSummarySchema, head: sideSummarySchema }).nullable(),
    settings: z.strictObject({
      task: z.enum(['binary', 'regression', 'multiclass']),
      classes: list(text).optional(),
      target: text,
      metric: text,
      higherIsBetter: z.boolean(),
      draws: count,
      refits: count,
      seed: uint32,
      policySource: text,
      policyFrom: z.literal('head'),
      checks: record(evidenceSchema),
    }),
    timings: record(z.number().min(0)),
    cache: z.strictObject({ reused: list(text), measured: list(text), uncacheable: list(text) }).optional(),
    sensitivity: sensitivityReportSchema.optional(),
    gain: gainReportSchema.optional(),
    groups: list(z.strictObject({ name: text, members: list(text), automatic: z.boolean(), weakestLink: finite.nullable() })).optional(),
    slices: list(sliceRowSchema).optional(),
    caution: text.min(1),
  })
  .meta({
    title: 'plumbline GateReport, schema version 1',
    description: 'The JSON report plumbline writes; docs/report-json.md describes every field.',
  })

// The schema and the GateReport type must not drift apart: tsc fails here if either gains, loses
// or changes a field the other does not have.
type DeepReadonly<T> = T extends readonly (infer U)[]
  ? readonly DeepReadonly<U>[]
  : T extends object
    ? { readonly [K in keyof T]: DeepReadonly<T[K]> }
    : T
type Equal<A, B> = (<T>() => T extends A ? 1 : 2) extends <T>() => T extends B ? 1 : 2 ? true : false
const schemaMatchesReport: Equal<DeepReadonly<z.output<typeof gateReportSchema>>, DeepReadonly<GateReport>> = true
void schemaMatchesReport

/** The schema as a JSON Schema (draft 2020-12) document, as JSON holds it (null for undefined numbers). */
export function gateReportJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(gateReportSchema, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>
}

/** `features[3].head.mean`, `settings.checks["rank shift"]`, or `(top level)`. */
function describePath(path: readonly PropertyKey[]): string {
  if (path.length === 0) return '(top level)'
  return path
    .map((part, i) => {
      if (typeof part === 'number') return `[${part}]`
      const name = String(part)
      if (/^[A-Za-z_$][\w$]*$/.test(name)) return i === 0 ? name : `.${name}`
      return `[${JSON.stringify(name)}]`
    })
    .join('')
}

/** The path of the first own "__proto__" key in a parsed JSON value, or null. Iterative: no depth limit. */
function findPrototypeKey(json: unknown): PropertyKey[] | null {
  const stack: { value: unknown; path: PropertyKey[] }[] = [{ value: json, path: [] }]
  while (stack.length > 0) {
    const { value, path } = stack.pop()!
    if (typeof value !== 'object' || value === null) continue
    if (Object.prototype.hasOwnProperty.call(value, '__proto__')) return [...path, '__proto__']
    for (const [key, child] of Object.entries(value)) {
      stack.push({ value: child, path: [...path, Array.isArray(value) ? Number(key) : key] })
    }
  }
  return null
}

const shownIssues = 5
const maxIssueLength = 300

/**
 * Reads a parsed JSON value as a GateReport of schema version 1, or throws a UserError naming
 * `source` (the file) and the first few problems, each as path and problem. Undefined statistics
 * written as null come back as NaN. The problems are quoted without control characters and cut to
 * a few hundred characters, because the value may come from an untrusted job and the message goes
 * to the workflow log. Cost: one pass over the value.
 */
export function parseGateReport(json: unknown, source: string): GateReport {
  const isObject = typeof json === 'object' && json !== null && !Array.isArray(json)
  const version = isObject ? (json as { schemaVersion?: unknown }).schemaVersion : undefined
  if (typeof version === 'number' && version !== 1) {
    throw new UserError(
      `${source}: this is a plumbline report of schema version ${version}, and this plumbline reads version 1 only.`,
      'Write and publish the report with the same plumbline version.',
    )
  }
  const prototypeKey = findPrototypeKey(json)
  const result = gateReportSchema.safeParse(json)
  if (result.success && prototypeKey === null) return result.data
  const issues = [
    ...(prototypeKey ? [{ path: prototypeKey, message: 'the key "__proto__" is not allowed' }] : []),
    ...(result.success ? [] : result.error.issues),
  ]
  const lines = issues.slice(0, shownIssues).map((issue) => {
    const line = escapePlainText(`${describePath(issue.path)}: ${issue.message}`)
    return `  ${line.length > maxIssueLength ? `${line.slice(0, maxIssueLength)}…` : line}`
  })
  if (issues.length > shownIssues) lines.push(`  and ${issues.length - shownIssues} more`)
  const problems = issues.length === 1 ? '1 problem' : `${issues.length} problems`
  throw new UserError(
    `${source} is not a valid plumbline report (schema version 1), ${problems}:\n${lines.join('\n')}`,
    'Publish the report file exactly as the plumbline run wrote it, with the same plumbline version in both jobs.',
  )
}
