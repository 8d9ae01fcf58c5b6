/**
 * A small stand-in for the GitHub REST API on 127.0.0.1, for the few endpoints the action uses:
 * list (paginated, with Link headers as GitHub sends them), create and update issue comments, and
 * list pull requests by head. Switches make it answer 502 a number of times, or drop every
 * connection (down). It checks the token on every request and refuses comment bodies over GitHub's
 * 65,536-character limit with 422, so a test cannot pass with a comment GitHub would refuse.
 */
import { createServer, type IncomingMessage } from 'node:http'
import type { AddressInfo } from 'node:net'

export interface FakeComment {
  id: number
  body: string
  user: { login: string; type: string }
  created_at: string
  updated_at: string
  html_url: string
}

export interface FakePull {
  number: number
  head: { sha: string; ref: string; label: string }
  state: 'open' | 'closed'
}

export interface RecordedRequest {
  readonly method: string
  readonly path: string
  readonly status: number
}

export interface FakeGitHub {
  /** Base URL to pass as GITHUB_API_URL (no trailing slash). */
  readonly url: string
  readonly token: string
  /** Comments per issue number, in creation order. */
  readonly comments: Map<number, FakeComment[]>
  readonly pulls: FakePull[]
  readonly requests: RecordedRequest[]
  /** The next `times` requests get this status (502 by default) with an error body. */
  failNext(times: number, status?: number): void
  /** Down: every connection is dropped without an answer. */
  setDown(isDown: boolean): void
  /** Adds a comment as another user would (not through the API). */
  addComment(issue: number, body: string, login?: string): FakeComment
  close(): Promise<void>
}

export const githubCommentLimit = 65_536

export async function startFakeGitHub(options: { token: string; owner: string; repo: string; maxPerPage?: number }): Promise<FakeGitHub> {
  const comments = new Map<number, FakeComment[]>()
  const pulls: FakePull[] = []
  const requests: RecordedRequest[] = []
  let failures = { remaining: 0, status: 502 }
  let isDown = false
  let nextId = 1000
  let clock = Date.UTC(2026, 0, 5, 9, 0, 0)
  const prefix = `/repos/${options.owner}/${options.repo}`

  const stamp = () => new Date((clock += 1000)).toISOString()
  const addComment = (issue: number, body: string, login = 'github-actions[bot]') => {
    const id = nextId++
    const now = stamp()
    const comment: FakeComment = {
      id,
      body,
      user: { login, type: login.endsWith('[bot]') ? 'Bot' : 'User' },
      created_at: now,
      updated_at: now,
      html_url: `https://github.example/${options.owner}/${options.repo}/pull/${issue}#issuecomment-${id}`,
    }
    comments.set(issue, [...(comments.get(issue) ?? []), comment])
    return comment
  }

  const server = createServer((request, response) => {
    if (isDown) {
      request.socket.destroy()
      return
    }
    const chunks: Buffer[] = []
    request.on('data', (chunk: Buffer) => chunks.push(chunk))
    request.on('end', () => {
      const url = new URL(request.url ?? '/', 'http://127.0.0.1')
      const send = (status: number, body: unknown, headers: Record<string, string> = {}) => {
        requests.push({ method: request.method ?? '', path: url.pathname + url.search, status })
        response.writeHead(status, { 'content-type': 'application/json; charset=utf-8', ...headers })
        response.end(JSON.stringify(body))
      }
      if (failures.remaining > 0) {
        failures.remaining -= 1
        send(failures.status, { message: 'Server Error' })
        return
      }
      const auth = request.headers.authorization ?? ''
      if (auth !== `token ${options.token}` && auth !== `Bearer ${options.token}`) {
        send(401, { message: 'Bad credentials' })
        return
      }
      handle(request, url, Buffer.concat(chunks).toString('utf8'), send)
    })
  })

  function handle(
    request: IncomingMessage,
    url: URL,
    text: string,
    send: (status: number, body: unknown, headers?: Record<string, string>) => void,
  ) {
    const method = request.method ?? ''
    const path = url.pathname
    const listMatch = path.match(/^(.*)\/issues\/(\d+)\/comments$/)
    const updateMatch = path.match(/^(.*)\/issues\/comments\/(\d+)$/)
    const repoOf = (match: RegExpMatchArray) => match[1] === prefix
    if (listMatch && repoOf(listMatch) && method === 'GET') {
      const issue = Number(listMatch[2])
      const all = comments.get(issue) ?? []
      const perPage = Math.min(Number(url.searchParams.get('per_page') ?? 30) || 30, 100, options.maxPerPage ?? 100)
      const page = Math.max(1, Number(url.searchParams.get('page') ?? 1) || 1)
      const lastPage = Math.max(1, Math.ceil(all.length / perPage))
      const link = (n: number, rel: string) => {
        const target = new URL(url.href.replace('http://127.0.0.1', baseUrl))
        target.searchParams.set('page', String(n))
        target.searchParams.set('per_page', String(perPage))
        return `<${target.href}>; rel="${rel}"`
      }
      const links: string[] = []
      if (page < lastPage) links.push(link(page + 1, 'next'), link(lastPage, 'last'))
      if (page > 1) links.push(link(1, 'first'), link(page - 1, 'prev'))
      send(200, all.slice((page - 1) * perPage, page * perPage), links.length ? { link: links.join(', ') } : {})
      return
    }
    if (listMatch && repoOf(listMatch) && method === 'POST') {
      const body = readBody(text)
      if (body === null) return send(422, { message: 'Invalid request: body is required' })
      if (body.length > githubCommentLimit) return send(422, { message: 'Validation Failed', errors: [{ message: 'body is too long (maximum is 65536 characters)' }] })
      send(201, addComment(Number(listMatch[2]), body))
      return
    }
    if (updateMatch && repoOf(updateMatch) && method === 'PATCH') {
      const id = Number(updateMatch[2])
      const comment = [...comments.values()].flat().find((c) => c.id === id)
      if (!comment) return send(404, { message: 'Not Found' })
      if (comment.user.login !== 'github-actions[bot]') return send(403, { message: 'Resource not accessible by integration' })
      const body = readBody(text)
      if (body === null) return send(422, { message: 'Invalid request: body is required' })
      if (body.length > githubCommentLimit) return send(422, { message: 'Validation Failed', errors: [{ message: 'body is too long (maximum is 65536 characters)' }] })
      comment.body = body
      comment.updated_at = stamp()
      send(200, comment)
      return
    }
    if (path === `${prefix}/pulls` && method === 'GET') {
      const head = url.searchParams.get('head')
      const state = url.searchParams.get('state') ?? 'open'
      send(
        200,
        pulls.filter((p) => (head === null || p.head.label === head) && (state === 'all' || p.state === state)),
      )
      return
    }
    send(404, { message: 'Not Found', documentation_url: 'https://docs.github.com/rest' })
  }

  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`

  return {
    url: baseUrl,
    token: options.token,
    comments,
    pulls,
    requests,
    failNext(times, status = 502) {
      failures = { remaining: times, status }
    },
    setDown(value) {
      isDown = value
    },
    addComment,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.closeAllConnections()
        server.close((error) => (error ? reject(error) : resolve()))
      }),
  }
}

function readBody(text: string): string | null {
  try {
    const parsed = JSON.parse(text) as { body?: unknown }
    return typeof parsed.body === 'string' ? parsed.body : null
  } catch {
    return null
  }
}
