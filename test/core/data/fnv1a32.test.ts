import { describe, expect, it } from 'vitest'
import { fnv1a32 } from '../../../src/core/data/fnv1a32.ts'

const utf8 = (text: string) => new TextEncoder().encode(text)

describe('fnv1a32(bytes, basis)', () => {
  it('matches the FNV-1a 32-bit test vectors', () => {
    // Test vectors of the FNV reference code (from memory: "" -> offset basis, "a" -> 0xe40c292c,
    // "foobar" -> 0xbf9cf968); cross-checked with a Python transcription of draft-eastlake-fnv section 2.
    expect(fnv1a32(utf8(''))).toBe(0x811c9dc5)
    expect(fnv1a32(utf8('a'))).toBe(0xe40c292c)
    expect(fnv1a32(utf8('foobar'))).toBe(0xbf9cf968)
  })

  it('continues from an earlier hash given as the basis', () => {
    expect(fnv1a32(utf8('bar'), fnv1a32(utf8('foo')))).toBe(fnv1a32(utf8('foobar')))
  })
})
