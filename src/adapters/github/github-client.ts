/**
 * The GitHub REST client the action uses: @actions/github's Octokit (REST methods, pagination,
 * proxy support) with @octokit/plugin-retry (5xx and network failures are retried, 3 times by
 * default, waiting 1, 4 and 9 times the base delay) and @octokit/plugin-throttling (primary and
 * secondary rate limits wait for the time GitHub names and retry, at most twice). Every request
 * attempt is aborted after `requestTimeoutMilliseconds` (default 30 s), so an API that accepts the
 * connection and never answers fails the request (and, after the retries, the comment) instead of
 * hanging the step.
 */
import { getOctokit } from '@actions/github'
import { retry } from '@octokit/plugin-retry'
import { throttling } from '@octokit/plugin-throttling'

export type GitHubClient = ReturnType<typeof getOctokit>

export interface GitHubClientOptions {
  /** REST API root, GITHUB_API_URL on a runner (https://api.github.com, or a GHES /api/v3 URL). */
  readonly baseUrl: string
  /** Where retries and rate-limit waits are reported. */
  readonly log: (line: string) => void
  /** The retry plugin's unit of waiting; default 1000 ms. Tests shorten it. */
  readonly retryBaseMilliseconds?: number
  /** Rate-limit waits above this are not waited for; default 600 s. */
  readonly maxRateLimitWaitSeconds?: number
  /** Each attempt of a request is aborted after this; default 30 000 ms. */
  readonly requestTimeoutMilliseconds?: number
}

export const defaultRequestTimeoutMilliseconds = 30_000

const maxRateLimitRetries = 2

export function createGitHubClient(token: string, options: GitHubClientOptions): GitHubClient {
  const maxWait = options.maxRateLimitWaitSeconds ?? 600
  const onLimit = (kind: string) => (retryAfter: number, request: { method?: string; url?: string }, _octokit: unknown, retryCount: number) => {
    const what = `${request.method ?? 'request'} ${request.url ?? ''}`.trim()
    if (retryCount >= maxRateLimitRetries || retryAfter > maxWait) {
      options.log(`GitHub ${kind} rate limit on ${what}; not retrying (would wait ${retryAfter} s, retry ${retryCount + 1}).`)
      return false
    }
    options.log(`GitHub ${kind} rate limit on ${what}; retrying in ${retryAfter} s.`)
    return true
  }
  const quiet = () => undefined
  // Before retry in the plugin list, so that it sees every failed attempt, not only the last.
  const logFailures = (octokit: { hook: { error: (name: 'request', hook: (error: unknown, request: RequestLike) => never) => void } }) => {
    octokit.hook.error('request', (error, request) => {
      const status = (error as { status?: number }).status
      const message = error instanceof Error ? error.message : String(error)
      const sent = (error as { request?: RequestLike }).request ?? request
      options.log(`GitHub API ${sent.method ?? ''} ${pathOf(sent.url)}: ${status ?? 'no answer'} (${message})`)
      throw error
    })
  }
  const timeout = options.requestTimeoutMilliseconds ?? defaultRequestTimeoutMilliseconds
  // Listed first, so that every attempt the retry plugin makes gets a fresh deadline.
  const deadline = (octokit: { hook: { before: (name: 'request', hook: (request: { request?: Record<string, unknown> }) => void) => void } }) => {
    octokit.hook.before('request', (request) => {
      request.request = { ...request.request, signal: AbortSignal.timeout(timeout) }
    })
  }
  return getOctokit(
    token,
    {
      baseUrl: options.baseUrl,
      log: { debug: quiet, info: quiet, warn: (message: string) => options.log(message), error: (message: string) => options.log(message) },
      retry: { retryAfterBaseValue: options.retryBaseMilliseconds ?? 1000 },
      throttle: { onRateLimit: onLimit('primary'), onSecondaryRateLimit: onLimit('secondary') },
    },
    deadline as never,
    logFailures as never,
    retry,
    throttling,
  )
}

interface RequestLike {
  readonly method?: string
  readonly url?: string
}

/** The path of a request URL, without the query string or the host. */
function pathOf(url: string | undefined): string {
  if (!url) return ''
  try {
    return new URL(url, 'http://api.invalid').pathname
  } catch {
    return url.split('?')[0]
  }
}
