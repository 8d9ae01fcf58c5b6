import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { parse } from 'yaml'
import { readMarkedSection, renderActionTables, replaceMarkedSection } from '../../../scripts/write-action-docs.ts'

const read = (path: string) => readFileSync(new URL(`../../../${path}`, import.meta.url), 'utf8')
const actionText = read('action.yml')
const fix = 'Run node --import tsx scripts/write-action-docs.ts and commit the result.'

describe('the inputs and outputs tables (scripts/write-action-docs.ts)', () => {
  it('renderActionTables(action.yml) has one row per input and per output, in action.yml order', () => {
    const action = parse(actionText) as { inputs: Record<string, unknown>; outputs: Record<string, unknown> }
    const names = renderActionTables(actionText)
      .split('\n')
      .map((line) => line.match(/^\| `([^`]+)` \|/)?.[1])
      .filter((name) => name !== undefined)
    expect(names).toEqual([...Object.keys(action.inputs), ...Object.keys(action.outputs)])
  })

  for (const file of ['README.md', 'docs/action.md']) {
    it(`${file} carries the tables generated from action.yml`, () => {
      const section = readMarkedSection(read(file))
      expect(section, `${file} has no <!-- inputs:start --> ... <!-- inputs:end --> section. ${fix}`).not.toBeNull()
      expect(section, `${file}'s tables differ from action.yml. ${fix}`).toBe(renderActionTables(actionText))
    })
  }

  it('replaceMarkedSection fills an empty section and replaces a filled one, leaving the rest alone', () => {
    const empty = 'intro\n<!-- inputs:start -->\n<!-- inputs:end -->\noutro\n'
    const filled = replaceMarkedSection(empty, '| a |\n| b |')
    expect(filled).toBe('intro\n<!-- inputs:start -->\n| a |\n| b |\n<!-- inputs:end -->\noutro\n')
    expect(readMarkedSection(filled)).toBe('| a |\n| b |')
    expect(replaceMarkedSection(filled, '| c |')).toBe('intro\n<!-- inputs:start -->\n| c |\n<!-- inputs:end -->\noutro\n')
    expect(replaceMarkedSection('no markers here\n', '| c |')).toBe('no markers here\n')
  })
})
