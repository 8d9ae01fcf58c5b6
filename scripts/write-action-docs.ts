/**
 * Rewrites the inputs and outputs tables of the action's documentation from action.yml, the one
 * description of them: the lines between `<!-- inputs:start -->` and `<!-- inputs:end -->` in
 * README.md and docs/action.md (a file without the markers is left alone).
 *   node --import tsx scripts/write-action-docs.ts
 * test/adapters/action/action-docs.test.ts fails when a committed table differs from action.yml.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { parse } from 'yaml'

interface ActionYml {
  readonly inputs: Readonly<Record<string, { readonly description: string; readonly default?: string; readonly required?: boolean }>>
  readonly outputs: Readonly<Record<string, { readonly description: string }>>
}

const cell = (text: string) => text.replace(/\s+/g, ' ').trim().replace(/\|/g, '\\|')
const code = (text: string) => (text === '' ? '(empty)' : `\`${text}\``)

/** The generated section: the inputs table, then the outputs table. */
export function renderActionTables(actionYmlText: string): string {
  const action = parse(actionYmlText) as ActionYml
  const inputs = [
    '| input | default | what it does |',
    '| :- | :- | :- |',
    ...Object.entries(action.inputs).map(([name, input]) => `| \`${name}\` | ${code(input.default ?? '')} | ${cell(input.description)} |`),
  ]
  const outputs = [
    '| output | what it holds |',
    '| :- | :- |',
    ...Object.entries(action.outputs).map(([name, output]) => `| \`${name}\` | ${cell(output.description)} |`),
  ]
  return [...inputs, '', ...outputs].join('\n')
}

export const sectionStart = '<!-- inputs:start -->'
export const sectionEnd = '<!-- inputs:end -->'

/** The lines between the marker lines (no newline at either end), or null without both markers. */
export function readMarkedSection(text: string): string | null {
  const lines = text.split('\n')
  const start = lines.indexOf(sectionStart)
  const end = lines.indexOf(sectionEnd, start + 1)
  if (start < 0 || end < 0) return null
  return lines.slice(start + 1, end).join('\n')
}

/** `text` with the lines between the marker lines replaced by `section`; unchanged without markers. */
export function replaceMarkedSection(text: string, section: string): string {
  const lines = text.split('\n')
  const start = lines.indexOf(sectionStart)
  const end = lines.indexOf(sectionEnd, start + 1)
  if (start < 0 || end < 0) return text
  return [...lines.slice(0, start + 1), ...(section === '' ? [] : section.split('\n')), ...lines.slice(end)].join('\n')
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..')
  const section = renderActionTables(readFileSync(join(root, 'action.yml'), 'utf8'))
  for (const file of ['docs/action.md', 'README.md']) {
    const path = join(root, file)
    if (!existsSync(path)) continue
    const before = readFileSync(path, 'utf8')
    const after = replaceMarkedSection(before, section)
    if (readMarkedSection(before) === null) console.log(`${file}: no <!-- inputs:start --> section, left alone`)
    else if (after === before) console.log(`${file}: up to date`)
    else {
      writeFileSync(path, after)
      console.log(`${file}: tables rewritten from action.yml`)
    }
  }
}
