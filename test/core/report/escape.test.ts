import { execFileSync } from 'node:child_process'

import { describe, expect, it } from 'vitest'

import { missingReference } from '../../helpers/reference-packages.ts'
import {
  escapeMarkdownCell,
  escapeMarkdownText,
  escapePlainText,
  markdownCodeBlock,
} from '../../../src/core/report/escape.ts'

const wj = '\u2060' // WORD JOINER, invisible

// Expected strings follow the GitHub Flavored Markdown spec 0.29-gfm: backslash escapes of ASCII
// punctuation (§2.4), `\|` inside table cells (§4.10), entities for &, <, > (§2.5); mention and
// issue links are GitHub's own (docs.github.com "Basic writing and formatting syntax", from memory).
describe('escapeMarkdownCell(text)', () => {
  it('writes HTML as entities so a feature named <img src=x onerror=alert(1)> is inert', () => {
    expect(escapeMarkdownCell('<img src=x onerror=alert(1)>')).toBe('&lt;img src=x onerror=alert(1)&gt;')
    expect(escapeMarkdownCell('</details><!-- plumbline -->')).toBe('&lt;/details&gt;&lt;!-- plumbline --&gt;')
    expect(escapeMarkdownCell('AT&T &lt;')).toBe('AT&amp;T &amp;lt;')
  })

  it('escapes pipes, backslashes and the inline markup characters', () => {
    expect(escapeMarkdownCell('late|early')).toBe('late\\|early')
    expect(escapeMarkdownCell('a\\|b')).toBe('a\\\\\\|b')
    expect(escapeMarkdownCell('**bold** _it_ `code` ~~gone~~ $x$')).toBe(
      '\\*\\*bold\\*\\* \\_it\\_ \\`code\\` \\~\\~gone\\~\\~ \\$x\\$',
    )
    expect(escapeMarkdownCell('[click](javascript:alert(1))')).toBe('\\[click\\](javascript:alert(1))')
    expect(escapeMarkdownCell('![x](https://tracker.example/p.gif)')).toBe(`!\\[x\\](https:${wj}//tracker.example/p.gif)`)
  })

  it('breaks @mentions, #123 and GH-123 issue links, e-mail, https:// and www. auto-links', () => {
    expect(escapeMarkdownCell('@octocat')).toBe(`@${wj}octocat`)
    expect(escapeMarkdownCell('cc @northwind/dispatch-team')).toBe(`cc @${wj}northwind/dispatch-team`)
    expect(escapeMarkdownCell('fixes #123 and GH-45')).toBe(`fixes #${wj}123 and GH-${wj}45`)
    expect(escapeMarkdownCell('ops@courier.example')).toBe(`ops@${wj}courier.example`)
    expect(escapeMarkdownCell('www.courier.example/x')).toBe(`www${wj}.courier.example/x`)
  })

  it('makes a leading #, +, -, = harmless, and turns line breaks and tabs into spaces', () => {
    expect(escapeMarkdownCell('#123')).toBe(`\\#${wj}123`)
    expect(escapeMarkdownCell('# heading')).toBe('\\# heading')
    expect(escapeMarkdownCell('- item')).toBe('\\- item')
    expect(escapeMarkdownCell('+1')).toBe('\\+1')
    expect(escapeMarkdownCell('===')).toBe('\\===')
    expect(escapeMarkdownCell('  line one\r\nline two\nthree\t4  ')).toBe('line one line two three 4')
    expect(escapeMarkdownCell('0.25')).toBe('0.25')
  })

  it('replaces control characters and bidirectional overrides with U+FFFD', () => {
    expect(escapeMarkdownCell('red\u001b[31m')).toBe('red\uFFFD\\[31m')
    expect(escapeMarkdownCell('invoice\u202Etxt.exe')).toBe('invoice\uFFFDtxt.exe')
    expect(escapeMarkdownCell('nul\u0000')).toBe('nul\uFFFD')
  })

  it('leaves ordinary feature names as they are', () => {
    for (const name of ['distance km', 'stop-count', 'weather.score', 'Zustellfenster (h)', 'depot 7', '配達時間']) {
      expect(escapeMarkdownCell(name)).toBe(name)
    }
  })
})

describe('escapeMarkdownText(text)', () => {
  it('keeps single line breaks, drops blank lines, and escapes each line start', () => {
    expect(escapeMarkdownText('first\n\n\n- second\n  # third\n1. fourth\n> fifth')).toBe(
      'first\n\\- second\n\\# third\n1\\. fourth\n&gt; fifth',
    )
  })

  it('does everything the cell escaper does inside a line', () => {
    expect(escapeMarkdownText('@octocat said <b>hi</b> in #7 | ok')).toBe(`@${wj}octocat said &lt;b&gt;hi&lt;/b&gt; in #${wj}7 \\| ok`)
  })

  it('cannot open code, since leading spaces go and backticks are escaped', () => {
    expect(escapeMarkdownText('    indented\n```\nfence')).toBe('indented\n\\`\\`\\`\nfence')
  })
})

describe('escapePlainText(text)', () => {
  it('removes terminal control sequences and line breaks and changes nothing else', () => {
    expect(escapePlainText('a\u001b[2Jb\r\nc\td <x>|*')).toBe('a\uFFFD[2Jb c d <x>|*')
  })
})

describe('markdownCodeBlock(text)', () => {
  it('uses a fence longer than any backtick run inside', () => {
    expect(markdownCodeBlock('plain')).toBe('```text\nplain\n```')
    expect(markdownCodeBlock('a ```` b')).toBe('`````text\na ```` b\n`````')
  })
})

const nastyNames = [
  '<img src=x onerror=alert(1)>',
  '<script>alert(1)</script>',
  'a|b||c',
  'a\\|b',
  'trailing backslash \\',
  '**bold** _it_ `code` ~~gone~~',
  '[click](https://evil.example)',
  '<https://evil.example>',
  '- item',
  '# heading',
  '1. first',
  '===',
  '> quote',
  '&amp; &#64;octocat',
  '<!-- plumbline -->',
  '</details>',
  '```',
  '    indented',
  'line\nbreak',
]

function decodeEntities(html: string): string {
  return html.replace(/&quot;/g, '"').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&')
}

// GitHub's own markdown library (cmark-gfm, Debian package cmark-gfm 0.29.0.gfm.6) as the judge:
// each escaped name must come back as exactly its own characters, with no element inside.
// Skipped where cmark-gfm is not installed (apt-get install cmark-gfm).
describe.skipIf(missingReference('cmark-gfm', 'test/core/report/escape.test.ts', 'the rendering checks') !== undefined)('escaped names rendered by cmark-gfm', () => {
  const render = (markdown: string) =>
    execFileSync('cmark-gfm', ['-e', 'table', '-e', 'autolink', '-e', 'strikethrough'], { input: markdown }).toString()

  it('escapeMarkdownCell: every name is one plain-text cell', () => {
    const rows = nastyNames.map((name) => `| ${escapeMarkdownCell(name)} | x |`)
    const html = render(['| name | other |', '| - | - |', ...rows].join('\n'))
    const cells = [...html.matchAll(/<td>([\s\S]*?)<\/td>\n<td>x<\/td>/g)].map((m) => m[1])
    expect(cells).toHaveLength(nastyNames.length)
    cells.forEach((cell, i) => {
      expect(cell).not.toMatch(/<[a-z]/)
      expect(decodeEntities(cell).replace(/\u2060/g, '')).toBe(nastyNames[i].replace(/\n/g, ' ').trim())
    })
  })

  it('escapeMarkdownText: every name stays inside its list item as plain text', () => {
    const html = render(nastyNames.map((name) => `- ${escapeMarkdownText(name)}`).join('\n'))
    const items = [...html.matchAll(/<li>([\s\S]*?)<\/li>/g)].map((m) => m[1])
    expect(items).toHaveLength(nastyNames.length)
    items.forEach((item, i) => {
      expect(item).not.toMatch(/<[a-z]/)
      expect(decodeEntities(item).replace(/\u2060/g, '')).toBe(nastyNames[i].replace(/^ +/, ''))
    })
  })
})
