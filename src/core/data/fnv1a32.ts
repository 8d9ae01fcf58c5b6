/**
 * FNV-1a, 32-bit: for each byte, xor it into the state, then multiply by the FNV prime 16777619,
 * starting from the offset basis 2166136261 (Fowler, Noll & Vo; specified in the IETF draft
 * "The FNV Non-Cryptographic Hash Algorithm", draft-eastlake-fnv, section 2).
 *
 * `basis` lets a hash continue from an earlier one: fnv1a32(b, fnv1a32(a)) is the hash of a then b.
 * Not cryptographic, and short similar keys differ mostly in the low bits; finalize the result
 * (for example with MurmurHash3's fmix32) before comparing it against a threshold. O(bytes).
 */
export function fnv1a32(bytes: Uint8Array, basis = 0x811c9dc5): number {
  let h = basis >>> 0
  for (let i = 0; i < bytes.length; i++) {
    h ^= bytes[i]
    h = Math.imul(h, 0x01000193)
  }
  return h >>> 0
}
