/**
 * `plumbline.yml` text -> GateConfig, refusing anything doubtful with a UserError that names the
 * file, line and column, the key path as written (`checks.leakage.action`), the value received and
 * what is allowed; its `fix` says what to do. One problem is reported per run: the first in the file.
 *
 * YAML is read with the failsafe schema (every scalar is text), so `off`, `no`, `1.10` or a column
 * called `2019` reach the policy schema exactly as written; config.ts reads numbers itself.
 *
 * Positions: readPolicyFile returns, beside the config, where every key and value sits, so that
 * checkPolicyAgainstColumns can cite line:column once the data has been read.
 */
import { isAlias, isMap, isScalar, isSeq, LineCounter, parseDocument, type Document, type Node } from 'yaml'
import type { z } from 'zod'
import type { GateConfig } from '../config.ts'
import { policySchema, type PolicyRuleParams } from './policy-schema.ts'
import { UserError } from '../errors.ts'
import { describePolicyKey, type KeyPath } from './describe-policy-key.ts'
import { excerpt } from './excerpt.ts'
import { formatKeyPath } from './format-key-path.ts'
import { levenshteinDistance } from './levenshtein-distance.ts'

interface Place {
  readonly line: number
  readonly column: number
  readonly offset: number
}

interface Entry {
  /** The key, for mapping entries (list items have none). */
  readonly key?: Place
  /** Where the value starts (for an empty value: just after the key). */
  readonly value: Place
  /** Offset just past the value. */
  readonly end: number
}

/** Entries by path (see `pathId`). */
type Positions = ReadonlyMap<string, Entry>

/** A policy file read: its config, and where each key and value sits in the text. */
export interface PolicyFile {
  readonly config: GateConfig
  readonly source: string
  readonly positions: Positions
}

/** Limits on a policy's text and on what it expands to (a real policy has a few hundred values at most). */
export const maxPolicyCharacters = 1024 * 1024
const maxPolicyValues = 100_000
const maxPolicyDepth = 64

const pathId = (path: readonly PropertyKey[]) => JSON.stringify(path.map(String))

function at(source: string, place: Place | undefined): string {
  return place ? `${source}:${place.line}:${place.column}` : source
}

function where(path: readonly PropertyKey[]): string {
  return path.length === 0 ? 'at the top level' : `in ${formatKeyPath(path)}`
}

function under(path: readonly PropertyKey[]): string {
  return path.length === 0 ? 'at the top level' : `under ${formatKeyPath(path)}`
}

/** The nearest recorded entry at or above `path` (aliases record their own node only). */
function entryAt(positions: Positions, path: readonly PropertyKey[]): Entry | undefined {
  for (let n = path.length; n >= 0; n--) {
    const entry = positions.get(pathId(path.slice(0, n)))
    if (entry) return entry
  }
  return undefined
}

// ---------------------------------------------------------------------------------------------
// YAML -> plain values, positions, duplicate keys

function describeNode(node: unknown): string {
  if (isMap(node)) return 'a mapping'
  if (isSeq(node)) return 'a list'
  if (isScalar(node)) return `'${excerpt(String(node.value))}'`
  return 'something else'
}

function readDocument(text: string, source: string): { value: unknown; positions: Map<string, Entry> } {
  const empty = new UserError(
    `${source}: the file is empty; a policy needs at least version, task, target, data and model.`,
    "Run 'plumbline init' to write a starter policy, or see docs/policy.md.",
  )
  if (text.trim() === '') throw empty
  if (text.length > maxPolicyCharacters) {
    throw new UserError(
      `${source} is ${text.length} characters long; a policy is at most ${maxPolicyCharacters}.`,
      'Check that the policy path names plumbline.yml; a policy is a few dozen lines (docs/policy.md).',
    )
  }
  const lines = new LineCounter()
  const doc = parseDocument(text, { schema: 'failsafe', uniqueKeys: false, lineCounter: lines, prettyErrors: false })
  const place = (offset: number): Place => {
    const { line, col } = lines.linePos(offset)
    return { line, column: col, offset }
  }
  const syntax = doc.errors[0]
  if (syntax) {
    const reason = syntax.message.split('\n')[0].replace(/ at line \d+, column \d+.*$/, '').replace(/\.$/, '')
    throw new UserError(
      `${at(source, place(syntax.pos[0]))}: not valid YAML: ${reason}.`,
      'Fix the YAML at that line: nested keys are indented with spaces (no tabs), and a value holding ": " or starting with one of [ ] { } # & * ! | > \' " % @ ` is put in quotes.',
    )
  }
  const tagWarning = doc.warnings.find((warning) => warning.code === 'TAG_RESOLVE_FAILED')
  if (tagWarning) {
    const tag = tagWarning.message.replace(/^Unresolved tag: /, '')
    throw new UserError(
      `${at(source, place(tagWarning.pos[0]))}: the YAML tag '${excerpt(tag, 80)}' is not allowed; a policy holds plain text, lists and mappings.`,
      'Delete the tag (the part starting with !) and write the value itself.',
    )
  }
  const root = doc.contents
  if (root === null || (isScalar(root) && root.value === '' && root.type === 'PLAIN')) throw empty
  if (!isMap(root)) {
    throw new UserError(
      `${at(source, place(root.range?.[0] ?? 0))}: the top level must be a mapping of keys such as 'version: 1'; got ${describeNode(root)}.`,
      "Write one 'key: value' per line, starting with 'version: 1' (docs/policy.md); 'plumbline init' writes a starter policy.",
    )
  }
  const positions = new Map<string, Entry>()
  positions.set(pathId([]), { value: place(root.range?.[0] ?? 0), end: text.length })
  const expanding = new Set<Node>()
  // Aliases can repeat a subtree exponentially (a "billion laughs" file); the expanded policy is
  // bounded before it is built, and so is its depth.
  let budget = maxPolicyValues
  const toPlain = (node: unknown, path: (string | number)[]): unknown => {
    if (--budget < 0 || path.length > maxPolicyDepth) {
      throw new UserError(
        `${source}: the policy expands to more than ${budget < 0 ? `${maxPolicyValues} values` : `${maxPolicyDepth} levels`} (through YAML aliases or nesting); a policy is far smaller.`,
        'Write the values out instead of repeating them through aliases (*name), and keep the nesting as docs/policy.md shows.',
      )
    }
    if (node === null || node === undefined) return null
    if (isAlias(node)) {
      const target = node.resolve(doc as Document)
      if (!target || expanding.has(target)) {
        throw new UserError(`${at(source, place(node.range?.[0] ?? 0))}: the alias *${node.source} refers to itself or to nothing.`, 'Replace the alias with the value it should stand for.')
      }
      expanding.add(target)
      const value = toPlain(target, path)
      expanding.delete(target)
      return value
    }
    if (isScalar(node)) return node.type === 'PLAIN' && node.value === '' ? null : String(node.value)
    if (isSeq(node)) {
      return node.items.map((item, index) => {
        const range = (item as Node | null)?.range
        if (range) positions.set(pathId([...path, index]), { value: place(range[0]), end: range[1] })
        return toPlain(item, [...path, index])
      })
    }
    if (isMap(node)) {
      const result: Record<string, unknown> = Object.create(null)
      const seen = new Map<string, Place>()
      for (const pair of node.items) {
        const keyNode = pair.key as Node | null
        if (!isScalar(keyNode)) {
          throw new UserError(
            `${at(source, place(keyNode?.range?.[0] ?? node.range?.[0] ?? 0))}: ${keyNode ? 'a key must be plain text' : 'a value has no key'} ${where(path)}.`,
            "Write each setting as 'key: value', with the key as a plain word.",
          )
        }
        const key = String(keyNode.value)
        const keyPlace = place(keyNode.range![0])
        const earlier = seen.get(key)
        if (earlier) {
          throw new UserError(
            `${at(source, keyPlace)}: key '${excerpt(key)}' appears twice ${where(path)} (first at line ${earlier.line}).`,
            `Keep one '${excerpt(key)}:' line ${under(path)} and delete the other.`,
          )
        }
        seen.set(key, keyPlace)
        const valueNode = pair.value as Node | null
        const valueRange = valueNode?.range ?? [keyNode.range![1] + 1, keyNode.range![1] + 1]
        positions.set(pathId([...path, key]), { key: keyPlace, value: place(Math.min(valueRange[0], text.length)), end: valueRange[1] })
        result[key] = toPlain(valueNode, [...path, key])
      }
      return result
    }
    throw new UserError(`${at(source, place((node as Node).range?.[0] ?? 0))}: unsupported YAML content ${where(path)}.`, 'Use plain mappings, lists and text.')
  }
  return { value: toPlain(root, []), positions }
}

// ---------------------------------------------------------------------------------------------
// Schema issues -> one UserError

interface Problem {
  readonly offset: number
  readonly message: string
  readonly fix: string
}

function valueAt(root: unknown, path: readonly PropertyKey[]): unknown {
  let value = root
  for (const segment of path) {
    if (value === null || typeof value !== 'object') return undefined
    value = (value as Record<PropertyKey, unknown>)[segment]
  }
  return value
}

function describeValue(value: unknown): string {
  if (value === null || value === undefined) return 'an empty value'
  if (Array.isArray(value)) return value.length === 0 ? 'an empty list' : 'a list'
  if (typeof value === 'object') return 'a mapping'
  return `'${excerpt(String(value), 60)}'`
}

/** The closest name within Levenshtein distance 2 (and nearer than the name is long), or a snake_case spelling of a camelCase key. */
function closestName(name: string, candidates: readonly string[]): string | undefined {
  const snake = name.replace(/([a-z0-9])([A-Z])/g, '$1_$2').toLowerCase()
  if (snake !== name && candidates.includes(snake)) return snake
  let best: string | undefined
  let bestDistance = 3
  for (const candidate of candidates) {
    const distance = levenshteinDistance(name.toLowerCase(), candidate.toLowerCase())
    if (distance < bestDistance && distance < name.length) {
      best = candidate
      bestDistance = distance
    }
  }
  return best
}

function describeIssue(issue: z.core.$ZodIssue, raw: unknown, positions: Positions, source: string): Problem[] {
  const path = issue.path as (string | number)[]
  const params = (issue as { params?: PolicyRuleParams }).params
  if (issue.code === 'custom' && params?.kind === 'rule') {
    const entry = entryAt(positions, params.at ? [...path, ...params.at] : path)
    const place = params.pointAtValue ? entry?.value : (entry?.key ?? entry?.value)
    return [{ offset: place?.offset ?? Infinity, message: `${at(source, place)}: ${formatKeyPath(path)} ${issue.message}`, fix: params.fix }]
  }
  if (issue.code === 'unrecognized_keys') {
    const allowed = describePolicyKey(path)?.keys ?? []
    return issue.keys.map((key) => {
      const place = entryAt(positions, [...path, key])?.key
      const suggestion = closestName(key, allowed)
      return {
        offset: place?.offset ?? Infinity,
        message: `${at(source, place)}: unknown key '${excerpt(key)}' ${where(path)} (allowed: ${allowed.join(', ')}).${suggestion ? ` Did you mean '${suggestion}'?` : ''}`,
        fix: suggestion
          ? `Rename '${excerpt(key)}' to '${suggestion}', or delete it.`
          : `Delete '${excerpt(key)}', or rename it to one of the allowed keys (docs/policy.md describes each).`,
      }
    })
  }
  const parentPath = path.slice(0, -1)
  const key = path[path.length - 1]
  const parent = valueAt(raw, parentPath)
  const described = describePolicyKey(path)
  const isSection = described?.keys !== undefined || described?.isOpenMapping === true
  // An empty section (`builtin:` with nothing below) reads as null and counts as a mapping with no keys.
  const isAbsent = typeof key === 'string' && (parent === null || (typeof parent === 'object' && !Array.isArray(parent) && !Object.hasOwn(parent, key)))
  if (isAbsent && (parentPath.length === 0 || valueAt(raw, parentPath.slice(0, -1)) !== undefined)) {
    const entry = positions.get(pathId(parentPath))
    const place = parentPath.length === 0 ? undefined : entry?.key
    return [{
      offset: entry?.end ?? Infinity,
      message: `${at(source, place)}: missing required key '${key}' ${where(parentPath)}.`,
      fix: isSection
        ? `Add a '${key}:' section ${under(parentPath)}, ${issue.message} (docs/policy.md lists its keys).`
        : `Add '${key}:' ${under(parentPath)}, set to ${issue.message}.`,
    }]
  }
  const entry = entryAt(positions, path)
  const keyPath = formatKeyPath(path)
  const fix =
    keyPath === 'version'
      ? "Set 'version: 1'; this release of plumbline reads policy version 1 only."
      : isSection
        ? `Write ${keyPath} as ${issue.message}, one 'key: value' per line indented below it (docs/policy.md).`
        : `Set ${keyPath} to ${issue.message}${described && 'default' in described ? `, or delete the line to use the default (${String(described.default)})` : ''}.`
  return [{
    offset: entry?.value.offset ?? Infinity,
    message: `${at(source, entry?.value)}: ${keyPath} must be ${issue.message}; got ${describeValue(valueAt(raw, path))}.`,
    fix,
  }]
}

function readPolicy(text: string, source: string): { config: GateConfig; positions: Positions } {
  const { value, positions } = readDocument(text, source)
  const result = policySchema.safeParse(value)
  if (!result.success) {
    const problems = result.error.issues.flatMap((issue) => describeIssue(issue, value, positions, source))
    problems.sort((a, b) => a.offset - b.offset)
    const first = problems[0]
    throw new UserError(first.message, first.fix)
  }
  return { config: result.data, positions }
}

/**
 * Parses the text of a policy file into a frozen, fully resolved GateConfig (see config.ts for the
 * defaults). `source` names the file in messages as the user knows it (`plumbline.yml`).
 * Throws UserError for YAML syntax, an empty file, a top level that is not a mapping, duplicate or
 * unknown keys, values of the wrong type or range, a version other than 1, and the cross-field
 * rules of policySchema. Linear in the size of the file.
 */
export function parsePolicy(text: string, options: { source: string }): GateConfig {
  return readPolicy(text, options.source).config
}

/** parsePolicy, with the positions of every key kept beside the config for checkPolicyAgainstColumns. */
export function readPolicyFile(text: string, options: { source: string }): PolicyFile {
  return { ...readPolicy(text, options.source), source: options.source }
}

// ---------------------------------------------------------------------------------------------
// Rules that need the data

function listColumns(columns: readonly string[], most = 20): string {
  const shown = columns.slice(0, most).join(', ')
  return columns.length > most ? `${shown} and ${columns.length - most} more` : shown || 'none'
}

/**
 * Checks the names in a parsed policy against the columns the data actually has, once the gate has
 * read the training table: data.columns (roles other than ignore), data.split.by, every member of
 * importance.groups, model.onnx.features, and that no group is named like a column. `columns` is
 * the data's column names; the target and ignored columns may be left out (parseCsv checks those).
 * With `otherSide` (the other side's columns) a name needs to be a column of one side only, except
 * the id, which both sides must have. Throws a UserError for the first problem in file order, citing line:column, naming the policy
 * key, listing the columns and suggesting a close name.
 * Cost O(names · columns) plus the distances for the one name reported.
 */
export function checkPolicyAgainstColumns(policy: PolicyFile, columns: readonly string[], options: { readonly otherSide?: readonly string[] } = {}): void {
  const { config, positions, source } = policy
  // A name one side has is that side's feature-set change, not a mistake; the id must be on both.
  const known = new Set([...columns, ...(options.otherSide ?? [])])
  const onBoth = options.otherSide ? new Set(columns.filter((c) => options.otherSide!.includes(c))) : known
  const problems: Problem[] = []
  /** `pointAt` is the node holding the name: a key of data.columns, or a value everywhere else. */
  const missing = (path: KeyPath, pointAt: KeyPath, verb: string, name: string, fix: string, needsBoth = false) => {
    if ((needsBoth ? onBoth : known).has(name)) return
    const entry = entryAt(positions, pointAt)
    const place = pointAt.length > path.length && typeof pointAt[path.length] === 'string' ? entry?.key : entry?.value
    const suggestion = closestName(name, columns)
    problems.push({
      offset: place?.offset ?? Infinity,
      message: `${at(source, place)}: ${formatKeyPath(path)} ${verb} '${name}', which is not a column of the data (columns: ${listColumns(columns)}).${suggestion ? ` Did you mean '${suggestion}'?` : ''}`,
      fix,
    })
  }
  for (const [name, role] of Object.entries(config.data.columns)) {
    if (role === 'ignore') continue
    missing(['data', 'columns'], ['data', 'columns', name], 'gives a role to', name, `Correct '${name}' in data.columns, or delete its line if the data no longer has the column.`, role === 'id')
  }
  if (config.data.holdout.kind === 'split' && config.data.holdout.by !== undefined) {
    missing(['data', 'split', 'by'], ['data', 'split', 'by'], 'names', config.data.holdout.by, 'Set data.split.by to a column of the data (an id column is best), or delete the line to split rows at random.')
  }
  for (const [group, members] of Object.entries(config.importance.groups)) {
    const path = ['importance', 'groups', group]
    if (known.has(group)) {
      const entry = entryAt(positions, path)
      problems.push({
        offset: entry?.key?.offset ?? Infinity,
        message: `${at(source, entry?.key)}: ${formatKeyPath(path)} has the name of a column of the data; the report would show two rows called '${group}'.`,
        fix: `Rename the group, for example to '${group}_group'.`,
      })
    }
    members.forEach((member, index) => missing(path, [...path, index], 'lists', member, `Correct or remove '${member}' in ${formatKeyPath(path)}.`))
  }
  if (config.model.kind === 'onnx' && config.model.features) {
    const path = ['model', 'onnx', 'features']
    config.model.features.forEach((name, index) => missing(path, [...path, index], 'lists', name, `Correct or remove '${name}' in model.onnx.features.`))
  }
  if (problems.length > 0) {
    problems.sort((a, b) => a.offset - b.offset)
    throw new UserError(problems[0].message, problems[0].fix)
  }
}
