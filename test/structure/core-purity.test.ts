import { readdirSync, readFileSync } from 'node:fs'
import { join, relative } from 'node:path'
import { describe, expect, it } from 'vitest'

// The core (src/core) is pure: it never touches disk, environment, network, clock or Math.random,
// so that the same inputs give the same report and every stage can be tested without a machine.
// This test reads every core source file and names each line that breaks the rule.
const root = join(import.meta.dirname, '../../src/core')

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) =>
    entry.isDirectory() ? sourceFiles(join(dir, entry.name)) : entry.name.endsWith('.ts') ? [join(dir, entry.name)] : [],
  )
}

/** Forbidden in src/core, each with what it would let in. */
const forbidden: readonly [RegExp, string][] = [
  [/from\s+['"]node:/, 'a node: module (disk, network, processes)'],
  [/from\s+['"](fs|path|os|child_process|worker_threads|http|https|net|crypto|url|util)(\/[^'"]*)?['"]/, 'a Node built-in module'],
  [/\bimport\(\s*['"]node:/, 'a dynamic node: import'],
  [/\bprocess\./, 'the process (environment, arguments, exit)'],
  [/\bDate\b/, 'the clock'],
  [/\bperformance\.now\b/, 'the clock'],
  [/\bMath\.random\b/, 'an unseeded random number'],
  [/\b(setTimeout|setInterval|setImmediate)\s*\(/, 'a timer'],
  [/\bconsole\./, 'the console'],
  [/\bfetch\s*\(/, 'the network'],
]

/** Strips comments and string contents so that prose ("the Date column") is not mistaken for code. */
function codeOnly(text: string): string {
  return text
    .replace(/\/\*[\s\S]*?\*\//g, (m) => m.replace(/[^\n]/g, ' '))
    .replace(/(^|[^:])\/\/.*$/gm, '$1')
    .replace(/`(?:\\.|[^`\\])*`/g, (m) => m.replace(/[^\n]/g, ' '))
}

describe('src/core', () => {
  it('imports no Node module and reads no environment, clock, timer, console or Math.random', () => {
    const problems: string[] = []
    for (const file of sourceFiles(root)) {
      const lines = codeOnly(readFileSync(file, 'utf8')).split('\n')
      lines.forEach((line, i) => {
        for (const [pattern, what] of forbidden) {
          // Import lines keep their module names (they are strings), so test those on the raw text.
          if (pattern.test(line)) problems.push(`src/core/${relative(root, file)}:${i + 1} uses ${what}`)
        }
      })
      const raw = readFileSync(file, 'utf8').split('\n')
      raw.forEach((line, i) => {
        if (/^\s*import\b|^\s*export\s+.*\bfrom\b/.test(line)) {
          for (const [pattern, what] of forbidden.slice(0, 2)) {
            if (pattern.test(line)) problems.push(`src/core/${relative(root, file)}:${i + 1} imports ${what}`)
          }
        }
      })
    }
    expect([...new Set(problems)]).toEqual([])
  })

  it('would notice a forbidden line (the patterns match what they are meant to)', () => {
    const samples = ["import { readFile } from 'node:fs/promises'", 'const t = Date.now()', 'Math.random()', 'process.env.X', 'setTimeout(f, 1)', 'console.log(x)']
    for (const sample of samples) expect(forbidden.some(([pattern]) => pattern.test(sample))).toBe(true)
    expect(forbidden.some(([pattern]) => pattern.test(codeOnly('// the Date column'))))
      .toBe(false)
  })
})
