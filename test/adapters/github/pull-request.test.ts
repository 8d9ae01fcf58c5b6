// Payload shapes follow GitHub's webhook event payload documentation (pull_request, push,
// workflow_run), cut down to the fields the action reads plus a few it ignores; written from
// memory of those documents, not copied from a live payload.
import { describe, expect, it } from 'vitest'
import { UserError } from '../../../src/core/errors.ts'
import { parsePullRequestEvent } from '../../../src/adapters/github/pull-request.ts'

const baseSha = '1f0c2d3e4b5a69788796a5b4c3d2e1f0a9b8c7d6'
const headSha = '9a8b7c6d5e4f30211203f4e5d6c7b8a9f0e1d2c3'
const repository = { id: 4242, full_name: 'northwind-parcel/late-deliveries', owner: { login: 'northwind-parcel' } }

function pullRequestPayload(headRepo: unknown) {
  return {
    action: 'synchronize',
    number: 17,
    pull_request: {
      number: 17,
      state: 'open',
      base: { ref: 'main', sha: baseSha, repo: repository },
      head: { ref: 'add-roadworks', sha: headSha, repo: headRepo },
    },
    repository,
  }
}

const fork = { id: 9001, full_name: 'stranger/late-deliveries', owner: { login: 'stranger' }, fork: true }

describe('parsePullRequestEvent(eventName, payload, repository)', () => {
  it('reads a pull_request from a branch of the same repository', () => {
    expect(parsePullRequestEvent('pull_request', pullRequestPayload(repository), repository.full_name)).toEqual({
      name: 'pull_request',
      pullRequest: { number: 17, baseSha, headSha },
      baseSha,
      headSha,
      isHeadFromFork: false,
      isPrivileged: false,
      workflowRun: null,
    })
  })

  it('marks a head in another repository, or in a deleted fork, as a fork', () => {
    expect(parsePullRequestEvent('pull_request', pullRequestPayload(fork), repository.full_name).isHeadFromFork).toBe(true)
    expect(parsePullRequestEvent('pull_request', pullRequestPayload(null), repository.full_name).isHeadFromFork).toBe(true)
  })

  it('compares repository names without case, as GitHub does', () => {
    const same = { ...repository, full_name: 'Northwind-Parcel/Late-Deliveries' }
    expect(parsePullRequestEvent('pull_request', pullRequestPayload(same), repository.full_name).isHeadFromFork).toBe(false)
  })

  it('marks pull_request_target as privileged', () => {
    const event = parsePullRequestEvent('pull_request_target', pullRequestPayload(fork), repository.full_name)
    expect(event).toMatchObject({ isPrivileged: true, isHeadFromFork: true, pullRequest: { number: 17 } })
  })

  it('reads a push as before and after, with no base for a new branch', () => {
    const push = { ref: 'refs/heads/main', before: baseSha, after: headSha, repository }
    expect(parsePullRequestEvent('push', push, repository.full_name)).toMatchObject({ pullRequest: null, baseSha, headSha, isPrivileged: false })
    const created = { ...push, before: '0000000000000000000000000000000000000000', created: true }
    expect(parsePullRequestEvent('push', created, repository.full_name)).toMatchObject({ baseSha: null, headSha })
  })

  it('reads nothing from workflow_dispatch', () => {
    expect(parsePullRequestEvent('workflow_dispatch', { inputs: {}, ref: 'refs/heads/main', repository }, repository.full_name)).toEqual({
      name: 'workflow_dispatch',
      pullRequest: null,
      baseSha: null,
      headSha: null,
      isHeadFromFork: false,
      isPrivileged: false,
      workflowRun: null,
    })
  })

  function workflowRunPayload(pullRequests: unknown[], headRepository: unknown) {
    return {
      action: 'completed',
      workflow_run: {
        id: 555001,
        event: 'pull_request',
        head_sha: headSha,
        head_branch: 'add-roadworks',
        head_repository: headRepository,
        pull_requests: pullRequests,
      },
      repository,
    }
  }

  it('reads the pull request GitHub lists on a workflow_run from the same repository', () => {
    const listed = { number: 17, head: { sha: headSha, ref: 'add-roadworks', repo: { id: 4242 } }, base: { sha: baseSha, ref: 'main', repo: { id: 4242 } } }
    expect(parsePullRequestEvent('workflow_run', workflowRunPayload([listed], repository), repository.full_name)).toEqual({
      name: 'workflow_run',
      pullRequest: { number: 17, baseSha, headSha },
      baseSha,
      headSha,
      isHeadFromFork: false,
      isPrivileged: true,
      workflowRun: { id: 555001, event: 'pull_request', headSha, headBranch: 'add-roadworks', headOwner: 'northwind-parcel' },
    })
  })

  it('leaves the pull request to a lookup when a workflow_run from a fork lists none', () => {
    const event = parsePullRequestEvent('workflow_run', workflowRunPayload([], fork), repository.full_name)
    expect(event).toMatchObject({ pullRequest: null, isHeadFromFork: true, workflowRun: { headOwner: 'stranger', headBranch: 'add-roadworks' } })
  })

  it('ignores a listed pull request of another repository or of another head commit', () => {
    const elsewhere = { number: 3, head: { sha: headSha, repo: { id: 9001 } }, base: { sha: baseSha, repo: { id: 9001 } } }
    const stale = { number: 4, head: { sha: baseSha, repo: { id: 4242 } }, base: { sha: baseSha, repo: { id: 4242 } } }
    const event = parsePullRequestEvent('workflow_run', workflowRunPayload([elsewhere, stale], repository), repository.full_name)
    expect(event.pullRequest).toBeNull()
  })

  it('names the missing field of a broken payload', () => {
    const broken = pullRequestPayload(repository)
    ;(broken.pull_request.base as { sha?: string }).sha = undefined
    let error: unknown
    try {
      parsePullRequestEvent('pull_request', broken, repository.full_name)
    } catch (caught) {
      error = caught
    }
    expect(error).toBeInstanceOf(UserError)
    expect((error as UserError).message).toBe("The pull_request event payload has no commit SHA at 'pull_request.base.sha'.")
    expect((error as UserError).fix).toBe(
      'The action reads GITHUB_EVENT_PATH as the runner writes it; set the base and head inputs to run it from elsewhere.',
    )
  })
})
