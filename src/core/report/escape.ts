/**
 * Escaping for text that plumbline did not write: feature names, check messages, refs, and every
 * string of a report uploaded by another job. The rules follow the GitHub Flavored Markdown spec
 * (0.29-gfm): any ASCII punctuation may be backslash-escaped (§2.4), `\|` is how a cell holds a pipe
 * (§4.10), `&`, `<` and `>` written as entities can open no HTML (§2.5, §4.6, §6.6). On top of the
 * spec, GitHub links `@name` to a user (and notifies them), `#123` and `GH-123` to issues, and bare
 * `https://` and `www.` text to sites; a U+2060 WORD JOINER after the `@`, `#`, `GH-`, `:` or `www`
 * breaks each of those without changing what a reader sees. Copying such a name out of the comment
 * copies the invisible joiner too: the JSON report holds the names unchanged.
 *
 * Both markdown escapers also replace control characters and bidirectional overrides (which can make
 * a name read differently from what it is) with U+FFFD, and turn tabs into spaces.
 */

const wordJoiner = '\u2060'

/** C0 and C1 controls (except tab and line breaks, handled apart), DEL, and bidirectional controls. */
const unsafeCharacters =
  // eslint-disable-next-line no-control-regex
  /[\u0000-\u0008\u000e-\u001f\u007f-\u0084\u0086-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g
const lineBreaks = /\r\n|[\n\r\v\f\u0085\u2028\u2029]/g

/** Control and bidirectional characters become U+FFFD; tabs become spaces; line breaks stay. */
function neutralize(text: string): string {
  return text.replace(/\t/g, ' ').replace(unsafeCharacters, '\uFFFD')
}

const entities: Readonly<Record<string, string>> = { '&': '&amp;', '<': '&lt;', '>': '&gt;' }

/** Inline escaping of one line: entities, backslash escapes, then the GitHub auto-links broken. */
function escapeInline(line: string): string {
  return line
    .replace(/[&<>]/g, (c) => entities[c])
    .replace(/[\\`*_[\]~|$]/g, '\\$&')
    .replace(/@/g, `@${wordJoiner}`)
    .replace(/#(?=\d)/g, `#${wordJoiner}`)
    .replace(/\b(GH-)(?=\d)/gi, `$1${wordJoiner}`)
    .replace(/:\/\//g, `:${wordJoiner}//`)
    .replace(/\b(www)\./gi, `$1${wordJoiner}.`)
}

/**
 * What a line may not start with: `#` (heading), `+`/`-` (list item, thematic break, setext
 * underline), `=` (setext underline); with `isLine`, also `1.`/`1)` (ordered list, which cannot
 * start inside a table cell). Leading spaces go, so a line can never become indented code. `>`,
 * `*`, `_`, `` ` ``, `~` and `|` are already escaped inline.
 */
function escapeStart(text: string, isLine: boolean): string {
  const trimmed = text.trimStart()
  if (/^[#+\-=]/.test(trimmed)) return `\\${trimmed}`
  return isLine ? trimmed.replace(/^(\d+)([.)])/, '$1\\$2') : trimmed
}

/**
 * Text for one GitHub-flavored markdown table cell: line breaks become spaces (a cell is one line),
 * then everything `escapeMarkdownText` does. The result renders as exactly the input's characters
 * (plus invisible word joiners), with no link, mention, emphasis, code, HTML or cell break.
 */
export function escapeMarkdownCell(text: string): string {
  return escapeStart(escapeInline(neutralize(text).replace(lineBreaks, ' ').trim()), false)
}

/**
 * Text for a markdown paragraph or list item: each line is escaped as a cell is, and may not start
 * a block (heading, list, quote, code, table, HTML). Line breaks stay as `\n` (GitHub shows them
 * as breaks); blank lines are dropped, so the text cannot end the list or paragraph it sits in.
 */
export function escapeMarkdownText(text: string): string {
  return neutralize(text)
    .split(lineBreaks)
    .map((line) => escapeStart(escapeInline(line), true).trimEnd())
    .filter((line) => line !== '')
    .join('\n')
}

/**
 * Text for a terminal: control characters (ESC starts colour and cursor sequences) and bidirectional
 * overrides become U+FFFD, tabs and line breaks become spaces. Nothing else changes.
 */
export function escapePlainText(text: string): string {
  return neutralize(text).replace(lineBreaks, ' ')
}

/**
 * A fenced code block holding `text` literally: the fence is one backtick longer than the longest
 * run of backticks in the text (GFM §4.5), so nothing inside can close it. Controls are neutralized.
 */
export function markdownCodeBlock(text: string): string {
  const body = neutralize(text).replace(lineBreaks, '\n')
  const longestRun = (body.match(/`+/g) ?? []).reduce((longest, run) => Math.max(longest, run.length), 0)
  const fence = '`'.repeat(Math.max(3, longestRun + 1))
  return `${fence}text\n${body}\n${fence}`
}

const htmlEntities: Readonly<Record<string, string>> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' }

/**
 * Text for HTML element content or a quoted attribute (HTML Living Standard, 13.1.2.6: `&`, `<`,
 * `>` and both quotes as character references cannot open markup or end an attribute). Controls and
 * bidirectional overrides become U+FFFD and tabs spaces, as in the markdown; line breaks stay.
 */
export function escapeHtml(text: string): string {
  return neutralize(text).replace(/[&<>"']/g, (c) => htmlEntities[c])
}
