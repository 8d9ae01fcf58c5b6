import { getOctokit } from '@actions/github'
import { retry } from '@octokit/plugin-retry'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { commentMarker, upsertComment } from '../../../src/adapters/github/comment.ts'
import { createGitHubClient, type GitHubClient } from '../../../src/adapters/github/github-client.ts'
import { InternalError } from '../../../src/core/errors.ts'
import { startFakeGitHub, type FakeGitHub } from '../../helpers/fake-github.ts'

const owner = 'northwind-parcel'
const repo = 'late-deliveries'
const token = 'ghs_commenttesttoken'
const target = { owner, repo, issueNumber: 17 }

let fake: FakeGitHub
beforeEach(async () => {
  fake = await startFakeGitHub({ token, owner, repo, maxPerPage: 2 })
})
afterEach(async () => {
  await fake.close()
})

/**
 * The upsert logic against the fake server, through a client with retries but without the
 * throttling plugin: its write queue spaces writes 1-3 s apart across the whole process, which
 * would only slow these tests. createGitHubClient itself is tested below and end to end.
 */
function plainClient(): GitHubClient {
  return getOctokit(token, { baseUrl: fake.url, retry: { retryAfterBaseValue: 1 } }, retry)
}

describe('upsertComment(client, target, body, marker)', () => {
  it('creates the comment when the pull request has none, then updates that same comment', async () => {
    const client = plainClient()
    const first = await upsertComment(client, target, `${commentMarker}\nfirst run`)
    const second = await upsertComment(client, target, `${commentMarker}\nsecond run`)
    expect(first.action).toBe('created')
    expect(second).toEqual({ action: 'updated', id: first.id, url: first.url })
    expect(fake.comments.get(17)?.map((c) => c.body)).toEqual([`${commentMarker}\nsecond run`])
  })

  it('finds its comment on a later page (Link rel="next") and never creates a second', async () => {
    for (let i = 0; i < 5; i++) fake.addComment(17, `Looks good to me (${i})`, 'dispatcher-on-call')
    const ours = fake.addComment(17, `${commentMarker}\nold report`)
    fake.addComment(17, 'One more remark after the report', 'dispatcher-on-call')
    const posted = await upsertComment(plainClient(), target, `${commentMarker}\nnew report`)
    expect(posted).toMatchObject({ action: 'updated', id: ours.id })
    expect(fake.comments.get(17)).toHaveLength(7)
    // Pages of 2: the marked comment is the 6th, on page 3; listing stops there.
    expect(fake.requests.filter((r) => r.method === 'GET').map((r) => new URL(r.path, fake.url).searchParams.get('page') ?? '1')).toEqual(['1', '2', '3'])
  })

  it('does not take a comment that only quotes the marker for its own', async () => {
    fake.addComment(17, `> ${commentMarker}\n> quoted from the report: why does this block?`, 'dispatcher-on-call')
    const posted = await upsertComment(plainClient(), target, `${commentMarker}\nreport`)
    expect(posted.action).toBe('created')
    expect(fake.comments.get(17)).toHaveLength(2)
  })

  it('refuses a body that does not start with the marker, which the next run could not find', async () => {
    await expect(upsertComment(plainClient(), target, 'report without marker')).rejects.toThrow(InternalError)
    expect(fake.requests).toEqual([])
  })
})

describe('createGitHubClient(token, options)', () => {
  it('retries a 502 twice and logs each failed attempt', async () => {
    const lines: string[] = []
    const client = createGitHubClient(token, { baseUrl: fake.url, log: (line) => lines.push(line), retryBaseMilliseconds: 1 })
    fake.failNext(2, 502)
    const posted = await upsertComment(client, target, `${commentMarker}\nreport`)
    expect(posted.action).toBe('created')
    expect(fake.requests.map((r) => `${r.method} ${r.status}`)).toEqual(['GET 502', 'GET 502', 'GET 200', 'POST 201'])
    expect(lines).toEqual([
      `GitHub API GET /repos/${owner}/${repo}/issues/17/comments: 502 (Server Error)`,
      `GitHub API GET /repos/${owner}/${repo}/issues/17/comments: 502 (Server Error)`,
    ])
  })

  it('gives up on a server that drops every connection, after its retries', async () => {
    const lines: string[] = []
    const client = createGitHubClient(token, { baseUrl: fake.url, log: (line) => lines.push(line), retryBaseMilliseconds: 1 })
    fake.setDown(true)
    await expect(upsertComment(client, target, `${commentMarker}\nreport`)).rejects.toMatchObject({ status: 500 })
    // The first attempt and plugin-retry's 3 retries, each with no answer (reported as status 500).
    expect(lines).toEqual(Array(4).fill(`GitHub API GET /repos/${owner}/${repo}/issues/17/comments: 500 (other side closed)`))
  })
})
