/**
 * One comment per pull request: find it by the hidden marker it starts with and edit it, or create
 * it when there is none. Comments are listed page by page (100 a page) and the first one whose body
 * starts with the marker is the one; nothing ever creates a second while one exists.
 */
import { InternalError } from '../../core/errors.ts'
import type { GitHubClient } from './github-client.ts'

export const commentMarker = '<!-- plumbline -->'

export interface CommentTarget {
  readonly owner: string
  readonly repo: string
  readonly issueNumber: number
}

export interface PostedComment {
  readonly action: 'created' | 'updated'
  readonly id: number
  readonly url: string
}

/** Creates or updates the marked comment on `target`; the body must start with `marker`. */
export async function upsertComment(
  client: GitHubClient,
  target: CommentTarget,
  body: string,
  marker: string = commentMarker,
): Promise<PostedComment> {
  if (!body.startsWith(marker)) {
    throw new InternalError(`upsertComment needs a body that starts with the marker ${marker}, or the next run cannot find it`)
  }
  const where = { owner: target.owner, repo: target.repo }
  const existing = await findMarkedComment(client, target, marker)
  if (existing !== null) {
    const { data } = await client.rest.issues.updateComment({ ...where, comment_id: existing, body })
    return { action: 'updated', id: data.id, url: data.html_url }
  }
  const { data } = await client.rest.issues.createComment({ ...where, issue_number: target.issueNumber, body })
  return { action: 'created', id: data.id, url: data.html_url }
}

/** The id of the first comment whose body starts with the marker, or null; stops at the first hit. */
export async function findMarkedComment(client: GitHubClient, target: CommentTarget, marker: string): Promise<number | null> {
  const pages = client.paginate.iterator(client.rest.issues.listComments, {
    owner: target.owner,
    repo: target.repo,
    issue_number: target.issueNumber,
    per_page: 100,
  })
  for await (const page of pages) {
    const hit = page.data.find((comment) => (comment.body ?? '').trimStart().startsWith(marker))
    if (hit) return hit.id
  }
  return null
}
