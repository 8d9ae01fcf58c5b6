/**
 * What the triggering event says about the run: the pull request (number, base and head commits,
 * whether the head is a fork), the commits a push moved between, and whether the trigger runs with
 * a write token and secrets. Pure: takes the parsed payload of GITHUB_EVENT_PATH.
 */
import { UserError } from '../../core/errors.ts'

export interface PullRequestRef {
  readonly number: number
  readonly baseSha: string | null
  readonly headSha: string
}

export interface WorkflowRunRef {
  readonly id: number
  /** The event that started the run being reported on (pull_request for the fork pattern). */
  readonly event: string
  readonly headSha: string
  readonly headBranch: string | null
  /** Owner login of the repository the run's head came from. */
  readonly headOwner: string | null
}

export interface EventInfo {
  /** GITHUB_EVENT_NAME, e.g. pull_request. */
  readonly name: string
  /** The pull request the event names, when the payload names exactly one in this repository. */
  readonly pullRequest: PullRequestRef | null
  /** Commits the event suggests comparing; null leaves the choice to the inputs or the defaults. */
  readonly baseSha: string | null
  readonly headSha: string | null
  /** The head was pushed to another repository than this one (or the fork no longer exists). */
  readonly isHeadFromFork: boolean
  /** The job holds a write token and the repository's secrets (pull_request_target, workflow_run). */
  readonly isPrivileged: boolean
  readonly workflowRun: WorkflowRunRef | null
}

const privilegedEvents = new Set(['pull_request_target', 'workflow_run'])

/**
 * Reads the event payload for `eventName`. pull_request and pull_request_target give the pull
 * request and its base and head commits; push gives before and after (before is null for a new
 * branch); workflow_run gives the run's head commit and, when GitHub lists it (it does not for
 * heads in forks), the pull request; workflow_dispatch and anything else give nothing.
 * A payload that lacks a field its event always has is a UserError naming the field.
 */
export function parsePullRequestEvent(eventName: string, payload: unknown, repository: string): EventInfo {
  const event = new Fields(payload, eventName)
  const none: EventInfo = {
    name: eventName,
    pullRequest: null,
    baseSha: null,
    headSha: null,
    isHeadFromFork: false,
    isPrivileged: privilegedEvents.has(eventName),
    workflowRun: null,
  }
  if (eventName === 'pull_request' || eventName === 'pull_request_target') {
    const number = event.number('pull_request.number')
    const baseSha = event.sha('pull_request.base.sha')
    const headSha = event.sha('pull_request.head.sha')
    const baseName = event.optionalString('pull_request.base.repo.full_name') ?? repository
    const headName = event.optionalString('pull_request.head.repo.full_name')
    return {
      ...none,
      pullRequest: { number, baseSha, headSha },
      baseSha,
      headSha,
      isHeadFromFork: headName === null || !sameRepository(headName, baseName),
    }
  }
  if (eventName === 'push') {
    const before = event.optionalString('before')
    const after = event.optionalString('after')
    const isCommit = (sha: string | null): sha is string => sha !== null && isSha(sha) && !/^0+$/.test(sha)
    return { ...none, baseSha: isCommit(before) ? before : null, headSha: isCommit(after) ? after : null }
  }
  if (eventName === 'workflow_run') {
    const id = event.number('workflow_run.id')
    const headSha = event.sha('workflow_run.head_sha')
    const headName = event.optionalString('workflow_run.head_repository.full_name')
    const ownName = event.optionalString('repository.full_name') ?? repository
    const ownId = event.optionalNumber('repository.id')
    const listed = event.list('workflow_run.pull_requests').filter((entry, index) => {
      const item = new Fields(entry, `${eventName} (workflow_run.pull_requests[${index}])`)
      const baseId = item.optionalNumber('base.repo.id')
      const isOurs = ownId !== null && baseId !== null ? baseId === ownId : true
      return isOurs && item.optionalString('head.sha') === headSha
    })
    let pullRequest: PullRequestRef | null = null
    if (listed.length === 1) {
      const item = new Fields(listed[0], `${eventName} (workflow_run.pull_requests[])`)
      const baseSha = item.optionalString('base.sha')
      pullRequest = { number: item.number('number'), baseSha: baseSha !== null && isSha(baseSha) ? baseSha : null, headSha }
    }
    return {
      ...none,
      pullRequest,
      baseSha: pullRequest?.baseSha ?? null,
      headSha,
      isHeadFromFork: headName === null || !sameRepository(headName, ownName),
      workflowRun: {
        id,
        event: event.optionalString('workflow_run.event') ?? '',
        headSha,
        headBranch: event.optionalString('workflow_run.head_branch'),
        headOwner: event.optionalString('workflow_run.head_repository.owner.login'),
      },
    }
  }
  return none
}

function sameRepository(a: string, b: string): boolean {
  return a.toLowerCase() === b.toLowerCase()
}

function isSha(text: string): boolean {
  return /^[0-9a-f]{40}([0-9a-f]{24})?$/i.test(text)
}

/** Dotted-path reads from an untyped payload, with one message shape for a missing field. */
class Fields {
  constructor(
    private readonly root: unknown,
    private readonly eventName: string,
  ) {}

  private get(path: string): unknown {
    let value: unknown = this.root
    for (const key of path.split('.')) {
      if (value === null || typeof value !== 'object') return undefined
      value = (value as Record<string, unknown>)[key]
    }
    return value
  }

  private missing(path: string, what: string): never {
    throw new UserError(
      `The ${this.eventName} event payload has no ${what} at '${path}'.`,
      'The action reads GITHUB_EVENT_PATH as the runner writes it; set the base and head inputs to run it from elsewhere.',
    )
  }

  number(path: string): number {
    const value = this.get(path)
    if (typeof value !== 'number' || !Number.isSafeInteger(value) || value < 1) return this.missing(path, 'positive whole number')
    return value
  }

  optionalNumber(path: string): number | null {
    const value = this.get(path)
    return typeof value === 'number' && Number.isFinite(value) ? value : null
  }

  sha(path: string): string {
    const value = this.get(path)
    if (typeof value !== 'string' || !isSha(value)) return this.missing(path, 'commit SHA')
    return value
  }

  optionalString(path: string): string | null {
    const value = this.get(path)
    return typeof value === 'string' && value !== '' ? value : null
  }

  list(path: string): unknown[] {
    const value = this.get(path)
    return Array.isArray(value) ? value : []
  }
}
