/**
 * Values that must never appear in anything plumbline writes (the comment, report files, the job
 * summary, stderr, error messages): the action's token and every value registered with
 * @actions/core's setSecret; the CLI registers GITHUB_TOKEN, GH_TOKEN and INPUT_TOKEN when set.
 * `redactSecrets` replaces each (and its JSON-escaped and URL-encoded spellings) with `***`.
 * Values shorter than 4 characters are not registered: masking them would garble ordinary text.
 */
const secrets = new Set<string>()

export const redactedMark = '***'

export function registerSecret(value: string | undefined): void {
  if (value === undefined) return
  const trimmed = value.trim()
  for (const candidate of [value, trimmed]) {
    if (candidate.length < 4) continue
    secrets.add(candidate)
    secrets.add(JSON.stringify(candidate).slice(1, -1))
    secrets.add(encodeURIComponent(candidate))
    secrets.add(Buffer.from(candidate, 'utf8').toString('base64').replace(/=+$/, ''))
    // Each line of a multi-line secret on its own, as the runner's masking does.
    for (const line of candidate.split(/\r?\n/)) if (line.trim().length >= 4) secrets.add(line.trim())
  }
}

/** The CLI's secrets: the usual token variables when set. */
export function registerEnvironmentSecrets(env: Readonly<Record<string, string | undefined>> = process.env): void {
  for (const name of ['GITHUB_TOKEN', 'GH_TOKEN', 'INPUT_TOKEN', 'ACTIONS_RUNTIME_TOKEN', 'ACTIONS_ID_TOKEN_REQUEST_TOKEN']) registerSecret(env[name])
}

/** For tests: forget every registered value. */
export function clearSecrets(): void {
  secrets.clear()
}

export function redactSecrets(text: string): string {
  if (secrets.size === 0 || text === '') return text
  let result = text
  // Longest first, so that a secret containing another is masked whole.
  for (const secret of [...secrets].sort((a, b) => b.length - a.length)) {
    if (result.includes(secret)) result = result.split(secret).join(redactedMark)
  }
  return result
}

/** Every string inside `value` (objects and arrays walked, at most 64 levels deep) redacted. */
export function redactDeep<T>(value: T, depth = 0): T {
  if (typeof value === 'string') return redactSecrets(value) as T
  if (secrets.size === 0 || depth > 64 || value === null || typeof value !== 'object') return value
  if (Array.isArray(value)) return value.map((item) => redactDeep(item, depth + 1)) as T
  const copy: Record<string, unknown> = {}
  for (const [key, item] of Object.entries(value as Record<string, unknown>)) copy[redactSecrets(key)] = redactDeep(item, depth + 1)
  return copy as T
}
