/**
 * Seeded pseudo-random numbers: xoshiro128** (Blackman & Vigna 2018, "Scrambled linear
 * pseudorandom number generators", reference code at prng.di.unimi.it), seeded through SplitMix32.
 *
 * Why our own: the core must never call Math.random, every refit needs a seed it can record as a
 * plain integer and rerun alone, and we need cheap forks by label (`derive`). pure-rand offers the
 * generators but not derivation by label; this is 40 lines with a published reference.
 * Period 2^128 - 1; each call costs a handful of 32-bit integer operations.
 */
export interface Random {
  /** The seed this generator was created from (uint32), for the report. */
  readonly seed: number
  /** A float in [0, 1) with 32 bits of randomness. */
  next(): number
  /** A whole number in [0, n), unbiased (rejection of the short final range). */
  int(n: number): number
  /** A standard normal draw (Box-Muller, one value per call). */
  normal(): number
}

/** Mixes a 32-bit state (SplitMix32 finalizer, the constants of Stafford's mix13 variant for 32 bits). */
function splitmix32(state: number): number {
  let z = (state + 0x9e3779b9) | 0
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b)
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35)
  return (z ^ (z >>> 16)) >>> 0
}

/**
 * A child seed from a parent seed and labels (for example `deriveSeed(7, 'base', 'refit', 2)`).
 * FNV-1a over the labels' text, mixed with the parent; the same inputs always give the same uint32.
 */
export function deriveSeed(seed: number, ...labels: Array<string | number>): number {
  let h = 0x811c9dc5 ^ (seed >>> 0)
  for (const ch of labels.join('\u0000')) {
    h ^= ch.codePointAt(0)!
    h = Math.imul(h, 0x01000193)
  }
  return splitmix32(h ^ Math.imul(seed >>> 0, 0x9e3779b1))
}

/** A generator from a uint32 seed. Seeds outside uint32 are reduced modulo 2^32. */
export function createRandom(seed: number): Random {
  if (!Number.isFinite(seed)) throw new RangeError(`createRandom needs a finite seed, got ${seed}`)
  const seed32 = Math.trunc(seed) >>> 0
  let s = seed32
  const state = new Uint32Array(4)
  for (let i = 0; i < 4; i++) {
    s = (s + 0x9e3779b9) >>> 0
    state[i] = splitmix32(s)
  }
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1
  let spareNormal = NaN

  function nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(state[1], 5), 7), 9) >>> 0
    const t = state[1] << 9
    state[2] ^= state[0]
    state[3] ^= state[1]
    state[1] ^= state[2]
    state[0] ^= state[3]
    state[2] ^= t
    state[3] = rotl(state[3], 11)
    return result
  }

  return {
    seed: seed32,
    next: () => nextUint32() / 4294967296,
    int(n: number): number {
      if (!(n >= 1) || n > 4294967296 || !Number.isInteger(n)) {
        throw new RangeError(`int needs a whole number from 1 to 2^32, got ${n}`)
      }
      const limit = 4294967296 - (4294967296 % n)
      let x = nextUint32()
      while (x >= limit) x = nextUint32()
      return x % n
    },
    normal(): number {
      if (!Number.isNaN(spareNormal)) {
        const value = spareNormal
        spareNormal = NaN
        return value
      }
      let u = 0
      while (u === 0) u = nextUint32() / 4294967296
      const v = nextUint32() / 4294967296
      const radius = Math.sqrt(-2 * Math.log(u))
      spareNormal = radius * Math.sin(2 * Math.PI * v)
      return radius * Math.cos(2 * Math.PI * v)
    },
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0
}

/** Fisher-Yates shuffle of 0..n-1 (Knuth, TAOCP vol. 2, Algorithm P). */
export function shuffledIndices(n: number, random: Random): Uint32Array {
  const order = new Uint32Array(n)
  for (let i = 0; i < n; i++) order[i] = i
  for (let i = n - 1; i > 0; i--) {
    const j = random.int(i + 1)
    const tmp = order[i]
    order[i] = order[j]
    order[j] = tmp
  }
  return order
}
