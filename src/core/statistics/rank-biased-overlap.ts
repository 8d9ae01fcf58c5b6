/**
 * Rank-biased overlap of two ranked lists (Webber, Moffat & Zobel 2010, "A similarity measure for
 * indefinite rankings", ACM TOIS 28(4)), for lists seen only to some depth, possibly unequal.
 *
 * With persistence p in (0, 1), RBO = (1 − p) Σ_d p^{d−1} A_d, where A_d = X_d / d is the
 * agreement and X_d the overlap of the two top-d prefixes. Only prefixes are known, so three
 * numbers come back (s = shorter length, l = longer length, X_d for d > s counts the shorter list's
 * items among the longer list's first d):
 * - `extrapolated`: RBO_EXT for uneven lists (eq. 32), which assumes the agreement seen at the end of
 *   each list holds below it: (1−p)/p · [Σ_{d=1..l} X_d p^d / d + Σ_{d=s+1..l} X_s (d − s) p^d / (s d)]
 *   + [(X_l − X_s)/l + X_s/s] · p^l. For s = l it is the even-length RBO_EXT.
 * - `minimum`: RBO_MIN, the value if no unseen item ever matches: (1−p)/p · [Σ_{d=1..l} (X_d − X_l)
 *   p^d / d − X_l ln(1 − p)] (eq. 11 with k = l; we sum to the longer list's depth, since the
 *   overlaps down to l are known, which is how min + residual stays equal to the maximum below).
 * - `residual`: RBO_RES = RBO_MAX − RBO_MIN for uneven lists (eq. 30), with
 *   f = s + l − X_l the depth at which the best-case agreement reaches 1:
 *   p^s + p^l − p^f − (1−p)/p · [s Σ_{d=s+1..f} p^d/d + l Σ_{d=l+1..f} p^d/d + X_l (ln(1/(1−p)) − Σ_{d=1..f} p^d/d)].
 * (Equation numbers are from memory of the paper; the formulas were re-derived from its definitions.)
 * The tests check minimum and minimum + residual against the sums over explicit worst- and
 * best-case continuations of the lists, so the uneven formulas are tested against the definition.
 *
 * Edges: p outside (0, 1) and an item listed twice in one list are RangeErrors. If either list is
 * empty nothing is known: minimum 0, residual 1, extrapolated NaN. Cost: O(s + l) time and memory.
 */
export function rankBiasedOverlap(
  a: readonly string[],
  b: readonly string[],
  options: { persistence: number },
): { extrapolated: number; minimum: number; residual: number } {
  const p = options.persistence
  if (!(p > 0 && p < 1)) throw new RangeError(`rankBiasedOverlap needs persistence in (0, 1), got ${p}`)
  const [short, long] = a.length <= b.length ? [a, b] : [b, a]
  const s = short.length
  const l = long.length
  // overlap[d] = X_d for d = 0..l.
  const overlap = new Float64Array(l + 1)
  const seenShort = new Set<string>()
  const seenLong = new Set<string>()
  for (let d = 1; d <= l; d++) {
    let x = overlap[d - 1]
    const itemLong = long[d - 1]
    if (seenLong.has(itemLong)) throw duplicateError(itemLong, long === a ? 'first' : 'second')
    seenLong.add(itemLong)
    if (d <= s) {
      const itemShort = short[d - 1]
      if (seenShort.has(itemShort)) throw duplicateError(itemShort, short === a ? 'first' : 'second')
      seenShort.add(itemShort)
      if (itemShort === itemLong) x += 1
      else x += Number(seenLong.has(itemShort)) + Number(seenShort.has(itemLong))
    } else if (seenShort.has(itemLong)) {
      x += 1
    }
    overlap[d] = x
  }
  if (s === 0) return { extrapolated: NaN, minimum: 0, residual: 1 }

  const xs = overlap[s]
  const xl = overlap[l]
  const scale = (1 - p) / p
  const logInverse = -Math.log1p(-p) // ln(1 / (1 − p))
  let seenSum = 0 // Σ_{d<=l} X_d p^d / d
  let tailSum = 0 // Σ_{d=s+1..l} X_s (d − s) p^d / (s d)
  let minimumSum = 0 // Σ_{d<=l} (X_d − X_l) p^d / d
  let power = 1
  for (let d = 1; d <= l; d++) {
    power *= p
    seenSum += (overlap[d] * power) / d
    minimumSum += ((overlap[d] - xl) * power) / d
    if (d > s) tailSum += (xs * (d - s) * power) / (s * d)
  }
  const extrapolated = scale * (seenSum + tailSum) + ((xl - xs) / l + xs / s) * p ** l

  const f = s + l - xl
  let harmonicToF = 0 // Σ_{d=1..f} p^d / d
  let fromS = 0 // Σ_{d=s+1..f} p^d / d
  let fromL = 0 // Σ_{d=l+1..f} p^d / d
  power = 1
  for (let d = 1; d <= f; d++) {
    power *= p
    const term = power / d
    harmonicToF += term
    if (d > s) fromS += term
    if (d > l) fromL += term
  }
  const residual = p ** s + p ** l - p ** f - scale * (s * fromS + l * fromL + xl * (logInverse - harmonicToF))
  return { extrapolated, minimum: scale * (minimumSum + xl * logInverse), residual }
}

function duplicateError(item: string, which: 'first' | 'second'): RangeError {
  return new RangeError(`rankBiasedOverlap needs distinct items in each list; '${item}' appears twice in the ${which} list`)
}
