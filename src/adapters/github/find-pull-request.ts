/**
 * The pull request a workflow_run reports on, when the payload does not list it (GitHub leaves
 * `workflow_run.pull_requests` empty when the head is in a fork). Looked up from what the trusted
 * payload says, never from a file the untrusted job wrote: open pull requests whose head is
 * `<head owner>:<head branch>`, and of those the one whose head commit is the run's.
 */
import { UserError } from '../../core/errors.ts'
import type { GitHubClient } from './github-client.ts'
import type { WorkflowRunRef } from './pull-request.ts'

export async function findPullRequest(
  client: GitHubClient,
  repository: { readonly owner: string; readonly repo: string },
  run: WorkflowRunRef,
): Promise<number> {
  if (run.headOwner === null || run.headBranch === null) {
    throw new UserError(
      `The workflow_run payload names no head repository owner or branch for run ${run.id}, so its pull request cannot be found.`,
      'Run publish mode from a workflow_run event of the pull_request workflow (see docs/action.md).',
    )
  }
  const pulls = await client.paginate(client.rest.pulls.list, {
    ...repository,
    head: `${run.headOwner}:${run.headBranch}`,
    state: 'open',
    per_page: 100,
  })
  const matching = pulls.filter((pull) => pull.head.sha === run.headSha)
  if (matching.length !== 1) {
    throw new UserError(
      `Found ${matching.length === 0 ? 'no' : matching.length} open pull request${matching.length === 1 ? '' : 's'} with head ${run.headOwner}:${run.headBranch} at ${run.headSha.slice(0, 12)} (run ${run.id}).`,
      'The pull request may have been closed or pushed to since the run; the next run publishes again.',
    )
  }
  return matching[0].number
}
