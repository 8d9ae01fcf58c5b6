/**
 * How deep JSON text nests, found in one pass over the characters (strings skipped) before any parser
 * or schema walks it: deeply nested arrays cost a recursive walker quadratic time or its stack.
 * Returns null when the text stays within `maxDepth` levels, else a phrase for the message.
 */
export function boundNesting(text: string, maxDepth: number): string | null {
  let depth = 0
  let inString = false
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i)
    if (inString) {
      if (c === 0x5c) i++
      else if (c === 0x22) inString = false
    } else if (c === 0x22) inString = true
    else if (c === 0x5b || c === 0x7b) {
      depth++
      if (depth > maxDepth) return `deeper than ${maxDepth} levels (at character ${i})`
    } else if (c === 0x5d || c === 0x7d) depth--
  }
  return null
}
