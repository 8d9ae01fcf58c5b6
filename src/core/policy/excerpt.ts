/**
 * A piece of a file quoted in a message: at most `max` characters (default 40, then "…"), with line
 * breaks, tabs, control characters, escape sequences and bidirectional overrides written as escapes
 * (\n, \t, \u001b), so that quoting a file that is not a policy (a binary, /proc/self/environ) can
 * neither flood the message nor drive the terminal.
 */
// eslint-disable-next-line no-control-regex
const unsafe = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\ufeff]/g

export function excerpt(text: string, max = 40): string {
  const cut = [...text].length > max ? `${[...text].slice(0, max).join('')}…` : text
  return cut.replace(unsafe, (c) => (c === '\n' ? '\\n' : c === '\t' ? '\\t' : c === '\r' ? '\\r' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`))
}
