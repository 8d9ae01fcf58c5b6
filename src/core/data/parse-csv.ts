import { CsvError, parse } from 'csv-parse/sync'
import { levenshteinDistance } from '../policy/levenshtein-distance.ts'
import { UserError } from '../errors.ts'
import type { ColumnRole, Dataset, FeatureInfo, Target, Task } from './dataset.ts'

/**
 * What a file must look like to be read against another one: the training file's features with their
 * kinds and dictionaries, its id column and its target (task, and for a binary task the classes).
 * Build it with `schemaOf(trainingData)` and pass it to `parseCsv` for the holdout or reference file.
 */
export interface DataSchema {
  /** The file the schema came from, for messages. */
  readonly source: string
  readonly features: readonly FeatureInfo[]
  readonly idColumn?: string
  readonly target?: { readonly name: string; readonly task: Task; readonly classes?: readonly string[] }
}

export interface ParseCsvOptions {
  /** The file path as the user wrote it, for messages. */
  readonly source: string
  /** The target column's name (or give one column the role 'target' in `roles`). */
  readonly target?: string
  /** Without it: binary when the target has exactly two distinct values, else regression if numeric. */
  readonly task?: Task
  /** Declared roles by column name; they override inference. Ignored with `schema`, except 'ignore'. */
  readonly roles?: Readonly<Record<string, ColumnRole>>
  /** Read this file as another file read before (see `DataSchema`); decides features, id and target. */
  readonly schema?: DataSchema
  /** Default true: the target column must be in the file. False lets reference data come without it. */
  readonly requireTarget?: boolean
  /**
   * A numeric, categorical or ignore role for a column this file lacks is not an error: the gate
   * reads two sides, and a column one side lacks is that side's feature-set change (the gate checks
   * the names against both sides' columns instead). The id must still be there.
   */
  readonly featureRolesMayBeAbsent?: boolean
}

/** The schema a dataset was read with, for reading other files the same way. */
export function schemaOf(dataset: Dataset): DataSchema {
  const target = dataset.target
  return {
    source: dataset.source,
    features: dataset.features,
    ...(dataset.ids ? { idColumn: dataset.ids.name } : {}),
    ...(target
      ? {
          target: {
            name: target.name,
            task: target.classes ? (target.classes.length > 2 ? 'multiclass' : 'binary') : 'regression',
            ...(target.classes ? { classes: target.classes } : {}),
          },
        }
      : {}),
  }
}

const MISSING_TOKENS = new Set(['', 'na', 'nan', 'null'])
/** Decimal numbers only: "1e3", "-2.5", ".5" and "5." pass; "1,5", "12abc", "0x1F", "Infinity" do not. */
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/
const LINE_NOTE = '(the header is line 1)'
/** Spellings of infinity: a column holding them is numeric, and the cell is refused (no statistic survives it). */
const INFINITY_WORD = /^[+-]?(?:inf|infinity)$/i
/**
 * The largest magnitude a number may have: beyond it squares and sums overflow to Infinity and every
 * interval becomes NaN (a ±1e308 target). Far above any measured quantity (timestamps in
 * nanoseconds are about 1.7e18).
 */
export const MAX_MAGNITUDE = 1e100

/**
 * Reads CSV text (RFC 4180 quoting; comma delimiter; UTF-8 BOM, CRLF, LF or CR line ends, quoted
 * commas and line breaks) into a column-major `Dataset`.
 *
 * - Cells are trimmed. Empty, NA, NaN and null (any case) are missing: NaN in the column, counted in
 *   `missing`. Blank lines are skipped (so in a one-column file write NA, not an empty line).
 * - A column without a declared role is numeric when every non-missing cell is a decimal number
 *   (see NUMBER), else categorical. Categorical codes index a dictionary sorted by UTF-16 code units,
 *   so the codes do not depend on row order. The id column keeps its text; 'ignore' drops a column.
 * - Binary target: 0/1, false/true and no/yes (any case) take the second as positive. Any other pair
 *   takes the larger as positive: by value when both are numbers, else by code-unit order (for
 *   "late"/"on-time", "on-time" is positive). `classes` is [negative, positive] as written.
 * - With `schema`, features, kinds, dictionaries, id, target and classes come from the schema; an
 *   unseen category is NaN and counted in `unseenCategories`; columns the schema lacks are left out
 *   and listed in `extraColumns` (except those with the role 'ignore').
 *
 * Refuses with a UserError naming the file, line (the editor's: header = line 1; for a row spanning
 * several lines, the line it starts on), column and value: syntax errors, ragged rows, empty or
 * duplicate names, a missing or unlabelled target, text in a numeric column, a binary target without
 * exactly two classes. Cost: O(cells) time and memory.
 */
export function parseCsv(text: string, options: ParseCsvOptions): Dataset {
  const { header, rows, lineOf } = readRecords(text, options.source)
  return tableToDataset({ header, rows, place: (row) => `line ${lineOf(row)} ${LINE_NOTE}`, headerPlace: 'line 1' }, options)
}

/**
 * A table already split into cells, as a reader of any file format hands it over: the header, the
 * data rows as trimmed-or-untrimmed text cells, and how a message names where a data row is (for a
 * CSV "line 5 (the header is line 1)", for a Parquet file "row 4").
 */
export interface TextTable {
  readonly header: readonly string[]
  readonly rows: readonly (readonly string[])[]
  readonly place: (row: number) => string
  /** Where the column names are, for messages ("line 1", or "the schema"). */
  readonly headerPlace: string
}

/**
 * The text cells of a table into a `Dataset`, with every rule and message of `parseCsv` (missing
 * tokens, kind inference, dictionaries, schema, target classes); positions are named by `place`.
 */
export function tableToDataset(table: TextTable, options: ParseCsvOptions): Dataset {
  const { source } = options
  const { header, rows } = table
  const lineOf = table.place
  const columnIndex = checkHeader(header, source, table.headerPlace)
  const plan = options.schema ? planFromSchema(options, header, columnIndex) : planFromRoles(options, header, columnIndex, rows)
  const cells = (column: number) => rows.map((row) => row[column].trim())

  const features: FeatureInfo[] = []
  const columns: Float64Array[] = []
  const missing: number[] = []
  const unseen: Record<string, number> = {}
  for (const feature of plan.features) {
    const values = cells(feature.column)
    const column = new Float64Array(values.length)
    let missingCount = 0
    let unseenCount = 0
    let categories = feature.categories
    if (feature.kind === 'categorical' && !categories) {
      categories = [...new Set(values.filter((v) => !isMissing(v)))].sort(compareText)
    }
    const code = new Map(categories?.map((c, i) => [c, i]))
    for (let i = 0; i < values.length; i++) {
      const v = values[i]
      if (isMissing(v)) {
        column[i] = NaN
        missingCount++
      } else if (feature.kind === 'numeric') {
        column[i] = parseNumber(v) ?? failNumber(source, lineOf(i), feature.name, v, plan.numericReason)
      } else {
        const c = code.get(v)
        if (c === undefined) unseenCount++
        column[i] = c ?? NaN
      }
    }
    features.push(categories ? { name: feature.name, kind: 'categorical', categories } : { name: feature.name, kind: 'numeric' })
    columns.push(column)
    missing.push(missingCount)
    if (unseenCount > 0) unseen[feature.name] = unseenCount
  }

  const dataset: { -readonly [K in keyof Dataset]: Dataset[K] } = { source, rows: rows.length, features, columns, missing }
  if (plan.target) dataset.target = readTarget(source, plan.target, cells(plan.target.column), lineOf, options.schema?.source)
  if (plan.idColumn !== undefined) dataset.ids = { name: header[plan.idColumn].trim(), values: cells(plan.idColumn) }
  if (options.schema) {
    dataset.unseenCategories = unseen
    dataset.extraColumns = plan.extraColumns
  }
  return dataset
}

interface TargetPlan {
  readonly name: string
  readonly column: number
  readonly task?: Task
  readonly classes?: readonly string[]
}

interface Plan {
  readonly features: ReadonlyArray<{ name: string; column: number; kind: 'numeric' | 'categorical'; categories?: readonly string[] }>
  readonly idColumn?: number
  readonly target?: TargetPlan
  readonly extraColumns: string[]
  /** Why a numeric column must hold numbers, for the message. */
  readonly numericReason: string
}

function isMissing(value: string): boolean {
  return MISSING_TOKENS.has(value.toLowerCase())
}

function parseNumber(value: string): number | undefined {
  if (!NUMBER.test(value)) return undefined
  const x = Number(value)
  return Number.isFinite(x) && Math.abs(x) <= MAX_MAGNITUDE ? x : undefined
}

/** Written as a number, in range or not (1e309, inf): such a column is numeric, and out-of-range cells are refused. */
function looksNumeric(value: string): boolean {
  return NUMBER.test(value) || INFINITY_WORD.test(value)
}

function failNumber(source: string, line: string, column: string, value: string, reason: string): never {
  if (!looksNumeric(value)) failNotNumeric(source, line, column, value, reason)
  throw new UserError(
    `${at(source, line, column)}: ${show(value)} is not a finite number within ±1e100 (plumbline computes squares and sums of every value).`,
    'Correct the value, write NA or leave the cell empty if it is missing, or rescale the column (for example to thousands or a logarithm).',
  )
}

function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0
}

/** A value as it appears in a message: quoted, line breaks shown as \n, cut after 40 characters. */
function show(value: string): string {
  const flat = value.replace(/\r\n|\r|\n/g, '\\n')
  return `'${flat.length > 40 ? `${flat.slice(0, 40)}…` : flat}'`
}

function listNames(names: readonly string[], limit: number): string {
  const shown = names.slice(0, limit).map(show).join(', ')
  return names.length > limit ? `${shown} and ${names.length - limit} more` : shown
}

function count(n: number, noun: string): string {
  return `${n} ${noun}${n === 1 ? '' : 's'}`
}

function at(source: string, place: string, column?: string): string {
  return `${source}, ${place}${column === undefined ? '' : `, column ${show(column)}`}`
}

function failNotNumeric(source: string, line: string, column: string, value: string, reason: string): never {
  throw new UserError(
    `${at(source, line, column)}: ${show(value)} is not a number, but ${reason}.`,
    'Correct the value, or write NA or leave the cell empty if it is missing.',
  )
}

/** The records of the file, header apart, blank lines dropped, and the line each data row starts on. */
function readRecords(text: string, source: string): { header: string[]; rows: string[][]; lineOf: (row: number) => number } {
  if (text.replace(/^\uFEFF/, '').trim() === '') {
    throw new UserError(`${source} is empty.`, 'Write the column names on the first line and one row per example below it.')
  }
  // Byte offset where each record ends, as csv-parse counts them (UTF-8, BOM included).
  const ends: number[] = []
  let records: string[][]
  try {
    records = parse(text, {
      bom: true,
      relax_column_count: true,
      record_delimiter: ['\r\n', '\n', '\r'],
      on_record: (record: string[], context: { bytes: number }) => {
        ends.push(context.bytes)
        return record
      },
    }) as string[][]
  } catch (error) {
    if (!(error instanceof CsvError)) throw error
    const line = lineAtByte(text, ends.length === 0 ? 0 : ends[ends.length - 1])
    throw new UserError(
      `${at(source, `line ${line} ${LINE_NOTE}`)}: ${describeCsvError(error)}.`,
      'Enclose a field that holds a comma, a quote or a line break in double quotes, and write a quote inside it as two ("").',
    )
  }
  const starts = [0, ...ends.slice(0, -1)]
  const kept: number[] = []
  for (let r = 0; r < records.length; r++) {
    if (!(records[r].length === 1 && records[r][0].trim() === '')) kept.push(r)
  }
  const [headerRecord, ...dataRecords] = kept
  if (dataRecords.length === 0) {
    throw new UserError(`${source} has a header line but no data rows.`, 'Add data rows below the header, or check that the path names the right file.')
  }
  if (headerRecord !== 0) {
    throw new UserError(`${source} starts with a blank line.`, 'Put the column names on the first line.')
  }
  const header = records[headerRecord]
  const rows = dataRecords.map((r) => records[r])
  const lineOf = (row: number) => lineAtByte(text, starts[dataRecords[row]])
  for (let i = 0; i < rows.length; i++) {
    if (rows[i].length !== header.length) {
      throw new UserError(
        `${at(source, `line ${lineOf(i)} ${LINE_NOTE}`)}: the row has ${count(rows[i].length, 'field')}, the header has ${header.length}.`,
        'Give every row one field per header column; enclose a field that holds a comma in double quotes.',
      )
    }
  }
  return { header, rows, lineOf }
}

function describeCsvError(error: CsvError): string {
  switch (error.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return 'a quoted field that starts in this row is never closed'
    case 'CSV_INVALID_CLOSING_QUOTE':
      return 'a closing quote is followed by other characters'
    case 'INVALID_OPENING_QUOTE':
      return 'a quote appears inside a field that does not start with one'
    default:
      return `the CSV cannot be read (${error.message})`
  }
}

/** 1-based line at a UTF-8 byte offset, counting CRLF, LF and CR each as one line break. */
function lineAtByte(text: string, byteOffset: number): number {
  const bytes = new TextEncoder().encode(text)
  let line = 1
  for (let b = 0; b < byteOffset && b < bytes.length; b++) {
    if (bytes[b] === 0x0a || (bytes[b] === 0x0d && bytes[b + 1] !== 0x0a)) line++
  }
  return line
}

function checkHeader(header: readonly string[], source: string, place: string): Map<string, number> {
  const index = new Map<string, number>()
  header.forEach((raw, j) => {
    const name = raw.trim()
    if (name === '') {
      throw new UserError(`${source}, ${place}: column ${j + 1} of the header has no name.`, 'Name every column on the first line, or delete the unnamed column.')
    }
    const earlier = index.get(name)
    if (earlier !== undefined) {
      throw new UserError(
        `${source}, ${place}: the header names two columns ${show(name)} (columns ${earlier + 1} and ${j + 1}).`,
        'Give every column its own name.',
      )
    }
    index.set(name, j)
  })
  return index
}

/**
 * The columns nearest to `name` by Levenshtein distance, case-insensitive (then a column containing
 * the name or contained in it), at most `limit`: what the user probably meant, not the first few.
 */
export function closestColumns(name: string, columns: readonly string[], limit = 5): string[] {
  const wanted = name.toLowerCase()
  return columns
    .map((column, index) => {
      const lower = column.toLowerCase()
      const contains = lower.includes(wanted) || wanted.includes(lower) ? 0 : 1
      return { column, index, distance: levenshteinDistance(wanted, lower), contains }
    })
    .sort((a, b) => a.distance - b.distance || a.contains - b.contains || a.index - b.index)
    .slice(0, limit)
    .map((x) => x.column)
}

function failMissingTarget(source: string, name: string, header: readonly string[]): never {
  const columns = header.map((h) => h.trim())
  const closest = closestColumns(name, columns)
  throw new UserError(
    `${source} has no target column ${show(name)}. ` +
      (columns.length <= closest.length ? `Its columns are ${listNames(columns, closest.length)}.` : `The closest of its ${columns.length} columns: ${listNames(closest, closest.length)}.`),
    `Add the column ${show(name)} to the file, or name one of its columns as the target.`,
  )
}

function failNoTargetNamed(source: string): never {
  throw new UserError(`${source}: no target column was named.`, 'Name the column that holds the outcome to predict as the target.')
}

function planFromRoles(options: ParseCsvOptions, header: readonly string[], columnIndex: Map<string, number>, rows: readonly (readonly string[])[]): Plan {
  const { source } = options
  const roles = options.roles ?? {}
  const declared = (role: ColumnRole) => Object.keys(roles).filter((name) => roles[name] === role)
  const roleTargets = declared('target')
  const idNames = declared('id')
  if (roleTargets.length > 1) {
    throw new UserError(`${source}: only one column can be the target, but ${listNames(roleTargets, 5)} have the role 'target'.`, "Keep the role 'target' on one column.")
  }
  if (idNames.length > 1) {
    throw new UserError(`${source}: only one column can be the id, but ${listNames(idNames, 5)} have the role 'id'.`, "Keep the role 'id' on one column.")
  }
  if (options.target !== undefined && roleTargets.length === 1 && roleTargets[0] !== options.target) {
    throw new UserError(
      `${source}: the target is ${show(options.target)}, but the column ${show(roleTargets[0])} has the role 'target'.`,
      'Name the same column in both places, or only in one.',
    )
  }
  const targetName = options.target ?? roleTargets[0]
  if (targetName !== undefined && roles[targetName] !== undefined && roles[targetName] !== 'target') {
    throw new UserError(
      `${source}: the column ${show(targetName)} is the target, but it also has the role '${roles[targetName]}'.`,
      'Delete the other role of the target column.',
    )
  }
  for (const name of Object.keys(roles)) {
    if (name !== targetName && !columnIndex.has(name)) {
      if (options.featureRolesMayBeAbsent && roles[name] !== 'id') continue
      throw new UserError(
        `${source} has no column ${show(name)}, which has the role '${roles[name]}'. Its columns are ${listNames(header.map((h) => h.trim()), 20)}.`,
        'Correct the column name, or delete its role.',
      )
    }
  }
  const targetColumn = targetName === undefined ? undefined : columnIndex.get(targetName)
  if (options.requireTarget ?? true) {
    if (targetName === undefined) failNoTargetNamed(source)
    if (targetColumn === undefined) failMissingTarget(source, targetName, header)
  }

  const features: Array<Plan['features'][number]> = []
  header.forEach((raw, column) => {
    const name = raw.trim()
    const role = roles[name] ?? (name === targetName ? 'target' : undefined)
    if (role === 'numeric' || role === 'categorical') features.push({ name, column, kind: role })
    else if (role === undefined) {
      const isNumeric = rows.every((row) => {
        const v = row[column].trim()
        return isMissing(v) || looksNumeric(v)
      })
      features.push({ name, column, kind: isNumeric ? 'numeric' : 'categorical' })
    }
  })
  return {
    features,
    ...(idNames.length === 1 ? { idColumn: columnIndex.get(idNames[0]) } : {}),
    ...(targetName !== undefined && targetColumn !== undefined
      ? { target: { name: targetName, column: targetColumn, ...(options.task ? { task: options.task } : {}) } }
      : {}),
    extraColumns: [],
    numericReason: 'the column is declared numeric',
  }
}

function planFromSchema(options: ParseCsvOptions, header: readonly string[], columnIndex: Map<string, number>): Plan {
  const schema = options.schema!
  const { source } = options
  const needed = [...schema.features.map((f) => f.name), ...(schema.idColumn === undefined ? [] : [schema.idColumn])]
  const absent = needed.filter((name) => !columnIndex.has(name))
  if (absent.length > 0) {
    throw new UserError(
      `${source} lacks the column${absent.length > 1 ? 's' : ''} ${listNames(absent, 20)} that ${schema.source} has.`,
      `Add ${absent.length > 1 ? 'them' : 'it'}: a file read alongside ${schema.source} needs its feature and id columns.`,
    )
  }
  const target = schema.target
  const targetColumn = target === undefined ? undefined : columnIndex.get(target.name)
  if (options.requireTarget ?? true) {
    if (target === undefined) failNoTargetNamed(source)
    if (targetColumn === undefined) failMissingTarget(source, target.name, header)
  }
  const known = new Set([...needed, ...(target ? [target.name] : [])])
  const extraColumns = header.map((h) => h.trim()).filter((name) => !known.has(name) && options.roles?.[name] !== 'ignore')
  return {
    features: schema.features.map((f) => ({ name: f.name, column: columnIndex.get(f.name)!, kind: f.kind, ...(f.categories ? { categories: f.categories } : {}) })),
    ...(schema.idColumn === undefined ? {} : { idColumn: columnIndex.get(schema.idColumn) }),
    ...(target && targetColumn !== undefined ? { target: { ...target, column: targetColumn } } : {}),
    extraColumns,
    numericReason: `the column is numeric in ${schema.source}`,
  }
}

const NATURAL_NEGATIVES = new Map([
  ['0', '1'],
  ['false', 'true'],
  ['no', 'yes'],
])

/** [negative, positive] for two distinct labels (see parseCsv's doc comment). */
function orderClasses(a: string, b: string): [string, string] {
  if (NATURAL_NEGATIVES.get(a.toLowerCase()) === b.toLowerCase()) return [a, b]
  if (NATURAL_NEGATIVES.get(b.toLowerCase()) === a.toLowerCase()) return [b, a]
  const x = parseNumber(a)
  const y = parseNumber(b)
  if (x !== undefined && y !== undefined && x !== y) return x < y ? [a, b] : [b, a]
  return compareText(a, b) < 0 ? [a, b] : [b, a]
}

function readTarget(source: string, plan: TargetPlan, values: string[], lineOf: (row: number) => string, schemaSource?: string): Target {
  const column = plan.name
  values.forEach((v, i) => {
    if (isMissing(v)) {
      throw new UserError(
        `${at(source, lineOf(i), column)}: the target is missing (${v === '' ? 'the cell is empty' : `the cell is ${show(v)}`}).`,
        'Fill in the target or delete the row: a row without a target cannot be scored.',
      )
    }
  })
  const distinct = [...new Set(values)]
  if (plan.task === 'multiclass') return readClassTarget(source, plan, values, distinct, lineOf, schemaSource)
  const task = plan.task ?? (distinct.length === 2 || !values.every((v) => looksNumeric(v)) ? 'binary' : 'regression')
  if (task === 'regression') {
    const out = new Float64Array(values.length)
    values.forEach((v, i) => {
      out[i] = parseNumber(v) ?? failNumber(source, lineOf(i), column, v, 'the target of a regression must be one')
    })
    return { name: column, values: out }
  }
  let classes = plan.classes
  if (classes === undefined) {
    if (distinct.length === 1) {
      throw new UserError(
        `${source}, column ${show(column)}: a binary target needs two classes, but every row has ${show(distinct[0])}.`,
        'Check that the file holds rows of both outcomes and that the right column is the target.',
      )
    }
    if (distinct.length > 2) {
      throw new UserError(
        `${source}, column ${show(column)}: a binary target needs exactly two classes, found ${distinct.length}: ${listNames(distinct, 5)}.`,
        'Write the target with two values, or choose the regression task if it is a number.',
      )
    }
    classes = orderClasses(distinct[0], distinct[1])
  }
  const [negative, positive] = classes
  const out = new Float64Array(values.length)
  values.forEach((v, i) => {
    if (v === positive) out[i] = 1
    else if (v === negative) out[i] = 0
    else {
      throw new UserError(
        `${at(source, lineOf(i), column)}: ${show(v)} is not one of the target's classes in ${schemaSource} (${listNames(classes, 2)}).`,
        `Use the same two class labels as ${schemaSource}.`,
      )
    }
  })
  return { name: column, values: out, classes }
}

/**
 * A multiclass target: the labels as written, K >= 3 of them, in numeric order when every label is
 * a number (so integer codes 0..9 keep their order, as numpy.unique sorts them) and in text order
 * otherwise; each row's value is its label's index. Read against a schema, a label the training file
 * lacks is a UserError naming the file, line and value.
 */
function readClassTarget(
  source: string,
  plan: TargetPlan,
  values: readonly string[],
  distinct: readonly string[],
  lineOf: (row: number) => string,
  schemaSource?: string,
): Target {
  const column = plan.name
  let classes = plan.classes
  if (classes === undefined) {
    if (distinct.length < 3) {
      throw new UserError(
        `${source}, column ${show(column)}: a multiclass target needs at least three classes, found ${distinct.length}: ${listNames(distinct, 5)}.`,
        distinct.length === 2
          ? 'Set task: binary in the policy for a target with two classes.'
          : 'Check that the file holds rows of every outcome and that the right column is the target.',
      )
    }
    classes = orderLabels(distinct)
  }
  const index = new Map(classes.map((label, k) => [label, k]))
  const out = new Float64Array(values.length)
  values.forEach((v, i) => {
    const k = index.get(v)
    if (k === undefined) {
      throw new UserError(
        `${at(source, lineOf(i), column)}: the class ${show(v)} does not occur in ${schemaSource} (its classes: ${listNames(classes, 10)}).`,
        `Use only classes that ${schemaSource} has rows of, or add training rows of ${show(v)}: a model cannot be scored on a class it never saw.`,
      )
    }
    out[i] = k
  })
  return { name: column, values: out, classes }
}

/** Labels in numeric order when all are numbers (ties, e.g. '1' and '1.0', by text), else in text order. */
function orderLabels(labels: readonly string[]): string[] {
  const numbers = labels.map((label) => parseNumber(label))
  if (numbers.every((x) => x !== undefined)) {
    return labels
      .map((label, i) => ({ label, x: numbers[i]! }))
      .sort((a, b) => a.x - b.x || compareText(a.label, b.label))
      .map((entry) => entry.label)
  }
  return [...labels].sort(compareText)
}
