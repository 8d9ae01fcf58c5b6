/**
 * What policySchema allows at a key path, read from the schema itself so that messages, the
 * starter policy and the docs test cannot drift from it: the allowed keys of a mapping, the
 * default of a setting. Walks zod's schema definitions (`_zod.def`), unwrapping optional, default
 * and the preprocess / transform pipes the schema is built from.
 */
import { policySchema } from './policy-schema.ts'

export type KeyPath = readonly (string | number)[]

interface Definition {
  readonly type: string
  readonly innerType?: Schema
  readonly in?: Schema
  readonly out?: Schema
  readonly shape?: Readonly<Record<string, Schema>>
  readonly valueType?: Schema
  readonly element?: Schema
  readonly defaultValue?: unknown
  /** z.lazy (the recursive slice filter). */
  readonly getter?: () => Schema
}
interface Schema {
  readonly _zod: { readonly def: Definition }
}

export interface PolicyKeyDescription {
  /** A mapping with fixed keys: those keys, in the schema's order. */
  readonly keys?: readonly string[]
  /** A mapping whose keys the user chooses (data.columns, importance.groups). */
  readonly isOpenMapping: boolean
  readonly isList: boolean
  /** The default applied when the key is left out, as it would be written in YAML. */
  readonly default?: unknown
}

/** Steps through wrappers to the schema that parses the value, remembering a default on the way. */
function unwrap(schema: Schema): { schema: Schema; default?: unknown; hasDefault: boolean } {
  let current = schema
  let found: { value: unknown } | undefined
  for (;;) {
    const def = current._zod.def
    if (def.type === 'default' && !found) found = { value: def.defaultValue }
    if (def.innerType && ['optional', 'default', 'prefault', 'nullable', 'readonly', 'catch'].includes(def.type)) {
      current = def.innerType
    } else if (def.type === 'lazy' && def.getter) {
      current = def.getter()
    } else if (def.type === 'pipe' && def.in && def.out) {
      current = def.in._zod.def.type === 'transform' ? def.out : def.in
    } else {
      return found ? { schema: current, default: found.value, hasDefault: true } : { schema: current, hasDefault: false }
    }
  }
}

function child(schema: Schema, segment: string | number): Schema | undefined {
  const def = unwrap(schema).schema._zod.def
  if (def.type === 'object' && typeof segment === 'string') return def.shape && Object.hasOwn(def.shape, segment) ? def.shape[segment] : undefined
  if (def.type === 'record' && typeof segment === 'string') return def.valueType
  if (def.type === 'array' && typeof segment === 'number') return def.element
  return undefined
}

/** What the schema allows at `path`, or undefined if no such key exists. */
export function describePolicyKey(path: KeyPath): PolicyKeyDescription | undefined {
  let schema: Schema | undefined = policySchema as unknown as Schema
  for (const segment of path) {
    schema = child(schema, segment)
    if (!schema) return undefined
  }
  const inner = unwrap(schema)
  const def = inner.schema._zod.def
  return {
    ...(def.type === 'object' && def.shape ? { keys: Object.keys(def.shape) } : {}),
    isOpenMapping: def.type === 'record',
    isList: def.type === 'array',
    ...(inner.hasDefault ? { default: inner.default } : {}),
  }
}

/** Every fixed key path of the policy, depth first in schema order (open mappings contribute their own key only). */
export function listPolicyKeys(): KeyPath[] {
  const result: KeyPath[] = []
  const visit = (path: KeyPath) => {
    for (const key of describePolicyKey(path)?.keys ?? []) {
      result.push([...path, key])
      visit([...path, key])
    }
  }
  visit([])
  return result
}
