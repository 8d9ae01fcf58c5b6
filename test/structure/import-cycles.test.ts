import { readdirSync, readFileSync } from 'node:fs'
import { dirname, join, relative, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'

// No import cycles anywhere in src/: a cycle makes module order matter and hides which layer
// depends on which. Type-only imports count too (they tie the design together just the same).
const src = join(import.meta.dirname, '../../src')

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) =>
    entry.isDirectory() ? sourceFiles(join(dir, entry.name)) : entry.name.endsWith('.ts') ? [join(dir, entry.name)] : [],
  )
}

/** Relative imports (static, re-exports and dynamic) of each file, resolved to files. */
export function importGraph(files: readonly string[]): Map<string, string[]> {
  const graph = new Map<string, string[]>()
  for (const file of files) {
    const text = readFileSync(file, 'utf8')
    const targets = [...text.matchAll(/(?:from|import)\s*\(?\s*['"](\.{1,2}\/[^'"]+)['"]/g)].map((m) => resolve(dirname(file), m[1]))
    graph.set(file, targets.filter((t) => files.includes(t)))
  }
  return graph
}

/** Every cycle found by a depth-first search, each as the list of files around it. */
export function findCycles(graph: ReadonlyMap<string, readonly string[]>): string[][] {
  const state = new Map<string, 'open' | 'done'>()
  const stack: string[] = []
  const cycles: string[][] = []
  const visit = (node: string) => {
    state.set(node, 'open')
    stack.push(node)
    for (const next of graph.get(node) ?? []) {
      if (state.get(next) === 'open') cycles.push([...stack.slice(stack.indexOf(next)), next])
      else if (!state.has(next)) visit(next)
    }
    stack.pop()
    state.set(node, 'done')
  }
  for (const node of graph.keys()) if (!state.has(node)) visit(node)
  return cycles
}

describe('imports in src/', () => {
  it('form no cycle', () => {
    const cycles = findCycles(importGraph(sourceFiles(src))).map((cycle) => cycle.map((f) => relative(src, f)).join(' -> '))
    expect(cycles).toEqual([])
  })

  it('are followed into a cycle when there is one (the search itself works)', () => {
    const graph = new Map([
      ['a', ['b']],
      ['b', ['c']],
      ['c', ['a']],
      ['d', ['a']],
    ])
    expect(findCycles(graph)).toEqual([['a', 'b', 'c', 'a']])
  })
})
