/**
 * The action: read the inputs and the event, run the check (or, in publish mode, read a report an
 * earlier job wrote), then write the report files, the pull-request comment, the job summary and
 * the outputs, and fail the step when the verdict is at or above 'fail-on'. A run that fails still
 * gets all of these, as an 'error' report that says no verdict was reached.
 *
 * Everything outside is passed in (`ActionDependencies`), so tests run it with fakes.
 */
import { writeFile } from 'node:fs/promises'
import { dirname, join, resolve } from 'node:path'
import { decideVerdict } from '../../core/checks/verdict.ts'
import { describeFailure, UserError } from '../../core/errors.ts'
import { errorReport } from '../../core/report/error-report.ts'
import { escapeMarkdownText } from '../../core/report/escape.ts'
import { renderHtml } from '../../core/report/render-html.ts'
import { renderMarkdown } from '../../core/report/render-markdown.ts'
import type { GateReport } from '../../core/report/report.ts'
import { parseGateReport } from '../../core/report/report-schema.ts'
import { fitReportLimits } from '../../core/report/fit-report-limits.ts'
import type { GateProgress } from '../../core/run-gate.ts'
import type { CheckRequest } from '../check/run-check.ts'
import type { runMerge, runPlan, runShard, ShardPlan, ShardResult } from '../check/run-shards.ts'
import type { UnitCacheStore } from '../check/unit-cache.ts'
import { commentMarker, upsertComment } from '../github/comment.ts'
import type { FetchCommitRequest } from '../github/fetch-base.ts'
import { findPullRequest } from '../github/find-pull-request.ts'
import type { GitHubClient, GitHubClientOptions } from '../github/github-client.ts'
import { parsePullRequestEvent, type EventInfo } from '../github/pull-request.ts'
import { toolVersion } from '../version.ts'
import { readConfinedFile, readLimits, readRegularFile, resolveConfined, resolveConfinedOutput } from '../files/confined-file.ts'
import { boundNesting } from '../security/bound-nesting.ts'
import { redactDeep, redactSecrets, registerSecret } from '../security/secrets.ts'
import { createActionsCacheStore, type CacheClient } from './actions-cache-store.ts'
import { inputDefaults, isFailingVerdict, readInputs, readToken, type ActionInputs } from './inputs.ts'
import { makeFolder } from '../files/make-folder.ts'

/** The part of @actions/core the action uses. */
export interface ActionCore {
  getInput(name: string): string
  info(message: string): void
  warning(message: string): void
  setSecret(secret: string): void
  setOutput(name: string, value: string): void
  setFailed(message: string): void
  group<T>(name: string, fn: () => Promise<T>): Promise<T>
  /** Appends markdown to the job summary (GITHUB_STEP_SUMMARY); throws when there is none. */
  appendSummary(markdown: string): Promise<void>
}

export interface ActionDependencies {
  readonly core: ActionCore
  readonly env: Readonly<Record<string, string | undefined>>
  /** The folder relative paths start from when GITHUB_WORKSPACE is not set. */
  readonly cwd: string
  readonly createClient: (token: string, options: GitHubClientOptions) => GitHubClient
  /** Loads what createClient needs; called once the event file is known to parse (index.ts). */
  readonly loadClient?: () => Promise<void>
  readonly runCheck: (request: CheckRequest) => Promise<GateReport>
  readonly fetchBase: (request: FetchCommitRequest) => Promise<string>
  /**
   * Uploads one file as a workflow artifact (@actions/artifact) and returns its id. Optional: without
   * it, or when it throws, the HTML report stays a file on the runner and the comment has no link.
   */
  readonly uploadArtifact?: (name: string, file: string, rootDirectory: string) => Promise<{ readonly id?: number }>
  /** plan, shard and merge modes: the command line's own (src/adapters/check/run-shards.ts). */
  readonly runPlan: (request: Parameters<typeof runPlan>[0]) => Promise<ShardPlan>
  readonly runShard: (request: Parameters<typeof runShard>[0]) => Promise<ShardResult>
  readonly runMerge: (request: Parameters<typeof runMerge>[0]) => Promise<GateReport>
  /**
   * Loads the Actions cache client (@actions/cache), for 'cache: true'. Optional: without it, or when
   * it throws, every unit is measured in the job, with a warning.
   */
  readonly loadCacheClient?: () => Promise<CacheClient>
}

/** GitHub refuses longer comments; the comment is rendered to stay below this. */
export const commentCharacterLimit = 65_536
const commentMaxCharacters = 60_000
/** Job summaries are limited to 1 MiB a step; UTF-16 units times 3 bytes stays below it. */
const summaryMaxCharacters = 300_000
/** A published report nesting deeper than this is refused before it is parsed (plumbline's own reach about 8). */
const maxReportNesting = 64

export async function run(deps: ActionDependencies): Promise<void> {
  const { core, env } = deps
  const getInput = (name: string) => core.getInput(name)
  // Masked first: a message about another input must not be able to show it.
  const token = readToken(getInput)
  if (token !== '') core.setSecret(token)
  registerSecret(token)

  const workspace = env.GITHUB_WORKSPACE || deps.cwd
  const repository = readRepository(env)
  const runnerTemp = env.RUNNER_TEMP || join(workspace, '.plumbline')
  const outputDirectory = join(runnerTemp, 'plumbline')
  const apiUrl = env.GITHUB_API_URL || 'https://api.github.com'
  let client: GitHubClient | null = null
  const github = () => (client ??= deps.createClient(token, { baseUrl: apiUrl, log: (line) => core.info(line) }))

  // Each early step on its own, so that a failure in one still leaves what the others found: a bad
  // input with a known pull request still comments; a broken event still sets the outputs.
  let event: EventInfo = parsePullRequestEvent('', {}, '')
  let early: unknown = null
  try {
    const payload = await readEventPayload(env.GITHUB_EVENT_PATH)
    await deps.loadClient?.()
    event = parsePullRequestEvent(env.GITHUB_EVENT_NAME ?? '', payload, repository?.slug ?? '')
  } catch (error) {
    early = error
  }
  let inputs: ActionInputs
  try {
    inputs = readInputs(getInput)
  } catch (error) {
    early ??= error
    inputs = fallbackInputs(getInput, token)
  }
  const context: RunContext = { deps, inputs, event, repository, workspace, outputDirectory, runnerTemp, github }
  if (early !== null) {
    const rawMode = getInput('mode').trim()
    const plan: CommentPlan =
      rawMode === 'plan' || rawMode === 'shard'
        ? { skipped: stepWithoutComment }
        : event.pullRequest && inputs.isCommentWanted
          ? basicCommentChecks(context, event.pullRequest.number)
          : { skipped: 'the run failed before the pull request was known' }
    await finish(context, { report: failedRunReport(early, inputs.policyPath), failure: early, plan, extraJson: null })
    return
  }
  if (inputs.mode === 'publish') await publish(context)
  else if (inputs.mode === 'plan' || inputs.mode === 'shard') await planOrShard(context)
  else await check(context)
}

/** Why plan and shard steps post nothing: the shards of a matrix would race for the one comment. */
const stepWithoutComment = 'a plan or shard step does not comment; the merge step posts the one comment, also when a shard failed'

/** The inputs to finish a run whose inputs could not be read: the defaults, the comment as asked when readable. */
function fallbackInputs(getInput: (name: string) => string, token: string): ActionInputs {
  const comment = getInput('comment').trim()
  return {
    policyPath: inputDefaults.policy,
    token,
    baseRef: null,
    headRef: null,
    isCommentWanted: !['false', 'False', 'FALSE'].includes(comment),
    failOn: 'block',
    mode: 'check',
    reportPath: null,
    isForkCodeAllowed: false,
    workingDirectory: inputDefaults['working-directory'],
    // No upload after an early failure: the comment and the summary carry the error.
    htmlArtifact: null,
    isCacheWanted: false,
    shards: null,
    shard: null,
    partialDirectory: inputDefaults['partial-dir'],
    after: [],
    partials: [],
  }
}

interface RunContext {
  readonly deps: ActionDependencies
  readonly inputs: ActionInputs
  readonly event: EventInfo
  readonly repository: { readonly owner: string; readonly repo: string; readonly slug: string } | null
  readonly workspace: string
  readonly outputDirectory: string
  /** RUNNER_TEMP, or a folder in the workspace outside a runner. */
  readonly runnerTemp: string
  readonly github: () => GitHubClient
}

/** Where the comment goes, or why there is none. */
type CommentPlan = { readonly issueNumber: number } | { readonly skipped: string }

/** Where the two sides come from: the inputs, else the event; null: the check's own default. */
function describeSides(context: RunContext) {
  const { inputs, event, workspace } = context
  const base = inputs.baseRef ?? event.baseSha
  const head = inputs.headRef ?? event.headSha
  const origin = (input: string | null, fromEvent: string | null, name: 'base' | 'head') =>
    input !== null ? `input '${name}'` : fromEvent !== null ? `the ${event.name} event` : null
  return {
    cwd: resolve(workspace, inputs.workingDirectory),
    base,
    head,
    baseOrigin: origin(inputs.baseRef, event.baseSha, 'base'),
    headOrigin: origin(inputs.headRef, event.headSha, 'head'),
  }
}

/** The configuration lines every mode that runs repository code logs first. */
function logSides(context: RunContext, sides: ReturnType<typeof describeSides>) {
  const { core } = context.deps
  const { inputs, event } = context
  core.info(`plumbline ${toolVersion}, mode ${inputs.mode}, event ${event.name || '(none)'}`)
  core.info(`Repository folder: ${sides.cwd}`)
  core.info(`Policy: ${inputs.policyPath}`)
  core.info(`Base: ${sides.base === null ? 'the merge base with the default branch' : `${sides.base} (from ${sides.baseOrigin})`}`)
  core.info(`Head: ${sides.head === null ? 'the checked-out working tree' : `${sides.head} (from ${sides.headOrigin})`}`)
  if (event.pullRequest) core.info(`Pull request: #${event.pullRequest.number}${event.isHeadFromFork ? ' (head from a fork)' : ''}`)
}

/** Refuses fork code where it must be, fetches the commits the sides name, and returns the request every runner takes. */
async function openSides(context: RunContext, sides: ReturnType<typeof describeSides>) {
  const { deps, inputs, event } = context
  const { core } = deps
  refuseForkCode(inputs, event)
  const fetch = (ref: string | null, label: string) => (ref === null ? undefined : deps.fetchBase({ cwd: sides.cwd, ref, label, log: (l) => core.info(l) }))
  const baseRef = await fetch(sides.base, `the base, from ${sides.baseOrigin}`)
  const headRef = await fetch(sides.head, `the head, from ${sides.headOrigin}`)
  return { cwd: sides.cwd, policyPath: inputs.policyPath, baseRef, headRef, log: (line: string) => core.info(line) }
}

/**
 * 'cache: true': the unit cache folder on this runner, behind the Actions cache. A client that cannot
 * be loaded warns and leaves the folder alone (every unit measured here).
 */
async function unitCacheOf(context: RunContext): Promise<{ cache?: string; cacheStore?: UnitCacheStore; done?: () => void }> {
  const { deps, inputs } = context
  const { core } = deps
  if (!inputs.isCacheWanted) return {}
  const cache = join(context.runnerTemp, 'plumbline-unit-cache')
  let client: CacheClient
  try {
    if (!deps.loadCacheClient) throw new Error('this build has no Actions cache client')
    client = await deps.loadCacheClient()
  } catch (error) {
    core.warning(`The Actions cache could not be loaded: ${error instanceof Error ? error.message : String(error)}. Every unit is measured in this job; the check still runs.`)
    return { cache }
  }
  const store = createActionsCacheStore({ client, warn: (m) => core.warning(m), info: (m) => core.info(m) })
  const entries = (n: number) => `${n} unit entr${n === 1 ? 'y' : 'ies'}`
  return {
    cache,
    cacheStore: store,
    done: () => core.info(`Actions cache, this step: ${entries(store.tally.restored)} restored, ${entries(store.tally.saved)} saved, ${store.tally.failed} failed.`),
  }
}

/** Folders named by an input, one per line, each inside the workspace and existing. */
async function confinedFolders(context: RunContext, name: 'after' | 'partials', paths: readonly string[]): Promise<string[]> {
  const folders: string[] = []
  for (const path of paths) {
    const missing = () =>
      new UserError(
        `Input '${name}': no folder or file ${path} (looked for ${join(context.workspace, path)}).`,
        `Download every ${name === 'after' ? 'refits ' : ''}shard's artifact into the workspace before this step (actions/download-artifact), and name the folders it wrote.`,
      )
    folders.push(await resolveConfined({ key: `Input '${name}'`, path, root: context.workspace, rootName: 'the workspace' }, missing))
  }
  return folders
}

/** Check mode, and merge mode: the same run, the same report files, comment, summary and outputs. */
async function check(context: RunContext): Promise<void> {
  const { deps, inputs, workspace } = context
  const { core } = deps
  const sides = describeSides(context)
  const plan = planComment(context)

  await core.group('Configuration', async () => {
    logSides(context, sides)
    core.info(`Comment: ${'issueNumber' in plan ? `on #${plan.issueNumber}` : `none (${plan.skipped})`}`)
    core.info(`Fail the step on: ${inputs.failOn === 'never' ? 'no verdict (a run that fails)' : `${inputs.failOn} or worse`}`)
    core.info(`Fork code: ${inputs.isForkCodeAllowed ? 'allowed' : 'refused under privileged triggers'}`)
    core.info(`Token: ${inputs.token ? 'set (masked)' : 'not set'}`)
    if (inputs.mode === 'merge') core.info(`Partial results: ${inputs.partials.join(', ')}`)
    if (inputs.isCacheWanted) core.info("Unit cache: the Actions cache (input 'cache')")
    if (inputs.reportPath) core.info(`JSON report copy: ${inputs.reportPath}`)
    return undefined
  })

  let report: GateReport
  let failure: unknown = null
  try {
    const started = performance.now()
    const request = { ...(await openSides(context, sides)), onProgress: progressLogger(core, started) }
    if (inputs.mode === 'merge') {
      report = await deps.runMerge({ ...request, dirs: await confinedFolders(context, 'partials', inputs.partials) })
    } else {
      const { done, ...cache } = await unitCacheOf(context)
      try {
        report = await deps.runCheck({ ...request, ...cache })
      } finally {
        done?.()
      }
    }
    core.info(`Verdict: ${report.verdict} (${((performance.now() - started) / 1000).toFixed(1)} s)`)
  } catch (error) {
    failure = error
    report = failedRunReport(error, inputs.policyPath)
  }
  let extraJson: string | null = null
  if (inputs.reportPath !== null) {
    try {
      extraJson = await resolveConfinedOutput({ key: "Input 'report'", path: inputs.reportPath, root: workspace, rootName: 'the workspace' }, { confine: true })
    } catch (error) {
      // The verdict stands, but the step fails: the copy the workflow asked for was not written.
      if (failure === null) failure = error
      if (report.verdict !== 'error') report = failedRunReport(error, inputs.policyPath)
    }
  }
  await finish(context, { report, failure, plan, extraJson })
}

/**
 * Plan mode: the matrix for the shard jobs. Shard mode: one shard of one stage, its partial result
 * file written to 'partial-dir'. Neither comments (stepWithoutComment); a failure fails the step
 * with its message (and the job summary), and the merge step then names the units that are missing.
 */
async function planOrShard(context: RunContext): Promise<void> {
  const { deps, inputs, workspace } = context
  const { core } = deps
  const sides = describeSides(context)
  const shards = inputs.shards as number
  await core.group('Configuration', async () => {
    logSides(context, sides)
    if (inputs.mode === 'plan') core.info(`Shards: ${shards}`)
    else {
      core.info(`Shard: ${inputs.shard} of ${shards}, the ${inputs.after.length > 0 ? `drop-columns stage (after ${inputs.after.join(', ')})` : 'refits stage'}`)
      core.info(`Partial result folder: ${inputs.partialDirectory}`)
      if (inputs.isCacheWanted) core.info("Unit cache: the Actions cache (input 'cache')")
    }
    core.info(`No pull-request comment: ${stepWithoutComment}.`)
    core.info(`Fork code: ${inputs.isForkCodeAllowed ? 'allowed' : 'refused under privileged triggers'}`)
    return undefined
  })
  try {
    const request = await openSides(context, sides)
    if (inputs.mode === 'plan') {
      const planned = await deps.runPlan({ ...request, shards })
      for (const line of planned.summary) core.info(line)
      core.setOutput('matrix', JSON.stringify(planned.matrix))
      core.setOutput('shard-count', String(shards))
      return
    }
    const after = await confinedFolders(context, 'after', inputs.after)
    // A file inside the folder, so that the folder may exist already (a rerun on the same runner).
    const target = await resolveConfinedOutput(
      { key: "Input 'partial-dir'", path: join(inputs.partialDirectory, 'plumbline-partial.json'), root: workspace, rootName: 'the workspace' },
      { confine: true },
    )
    const out = dirname(target)
    const { done, ...cache } = await unitCacheOf(context)
    let result: ShardResult
    try {
      result = await deps.runShard({ ...request, index: inputs.shard as number, of: shards, out, ...(after.length > 0 ? { after } : {}), ...cache })
    } finally {
      done?.()
    }
    const units = result.units.length
    core.info(
      `Shard ${inputs.shard} of ${shards} (${result.stage}): ${units} unit${units === 1 ? '' : 's'}${units > 0 ? ` (${result.units.join(', ')})` : ''}` +
        `${inputs.isCacheWanted ? `, ${result.reused.length} from the cache` : ''}; wrote ${result.path}`,
    )
    core.setOutput('partial-dir', out)
  } catch (error) {
    const message = redactSecrets(describeFailure(error))
    try {
      await core.appendSummary(`### plumbline ${inputs.mode} failed\n\n${escapeMarkdownText(message).split('\n').join('  \n')}\n`)
    } catch {
      // No summary file outside a runner: the failed step's message carries it.
    }
    core.setFailed(message)
  }
}

async function publish(context: RunContext): Promise<void> {
  const { deps, inputs, event, workspace } = context
  const { core } = deps
  const reportFile = join(workspace, inputs.reportPath as string)
  let plan: CommentPlan
  try {
    plan = await planPublishedComment(context)
  } catch (error) {
    plan = { skipped: `the pull request could not be found: ${describeFailure(error).split('\n')[0]}` }
  }

  await core.group('Configuration', async () => {
    core.info(`plumbline ${toolVersion}, mode publish, event ${event.name || '(none)'}`)
    core.info(`Report: ${reportFile}`)
    if (event.workflowRun) core.info(`Workflow run: ${event.workflowRun.id} (${event.workflowRun.event}), head ${event.workflowRun.headSha.slice(0, 12)}`)
    core.info(`Comment: ${'issueNumber' in plan ? `on #${plan.issueNumber}` : `none (${plan.skipped})`}`)
    core.info(`Fail the step on: ${inputs.failOn === 'never' ? 'no verdict (a report that cannot be used)' : `${inputs.failOn} or worse`}`)
    core.info(`Token: ${inputs.token ? 'set (masked)' : 'not set'}`)
    core.info('No repository code and no git run in this mode.')
    return undefined
  })

  let report: GateReport
  let failure: unknown = null
  try {
    report = await readPublishedReport(workspace, inputs.reportPath as string)
  } catch (error) {
    failure = error
    report = failedRunReport(error, 'the published report')
  }
  await finish(context, { report, failure, plan, extraJson: null })
}

/**
 * Reads and validates a report another job wrote. Its text is untrusted: it is never logged raw, it
 * must be a regular file inside the workspace of at most readLimits.report bytes, and its nesting is
 * bounded before the schema walks it.
 */
async function readPublishedReport(workspace: string, asTyped: string): Promise<GateReport> {
  const bytes = await readConfinedFile(
    { key: "Input 'report'", path: asTyped, root: workspace, rootName: 'the workspace' },
    {
      maxBytes: readLimits.report,
      what: 'plumbline report',
      missing: () =>
        new UserError(
          `Input 'report': no report file at ${asTyped} (looked for ${join(workspace, asTyped)}).`,
          'Check that the pull_request job uploaded the report and that the download step put it at this path (see docs/action.md).',
        ),
      limitFix: 'Publish the JSON report file plumbline wrote, unchanged.',
    },
  )
  const text = bytes.toString('utf8')
  const tooDeep = boundNesting(text, maxReportNesting)
  if (tooDeep !== null) {
    throw new UserError(`${asTyped} nests arrays or objects ${tooDeep}; a plumbline report nests at most ${maxReportNesting} levels.`, 'Publish the JSON report file plumbline wrote, unchanged.')
  }
  let json: unknown
  try {
    json = JSON.parse(text)
  } catch (error) {
    // The parser's message quotes the file; say only where it stopped.
    const position = /position (\d+)/.exec((error as Error).message)?.[1]
    throw new UserError(`${asTyped} is not valid JSON${position ? ` (stopped at character ${position})` : ''}.`, 'Publish the JSON report file plumbline wrote, unchanged.')
  }
  const report = parseGateReport(json, asTyped)
  if (report.verdict !== 'error' && decideVerdict(report.findings) !== report.verdict) {
    throw new UserError(
      `${asTyped} is not consistent: its verdict is '${report.verdict}' but its findings give '${decideVerdict(report.findings)}'.`,
      'The file was changed after plumbline wrote it; publish the report file exactly as the run wrote it.',
    )
  }
  return report
}

function planComment(context: RunContext): CommentPlan {
  const { inputs, event } = context
  if (!event.pullRequest) return { skipped: `a ${event.name || 'run without an event'} is not a pull request` }
  if (!inputs.isCommentWanted) return { skipped: "input 'comment' is false" }
  if (event.name === 'pull_request' && event.isHeadFromFork) {
    return {
      skipped:
        "the head is in a fork, so this pull_request job's token is read-only; publish the report from a workflow_run job with 'mode: publish' (docs/action.md)",
    }
  }
  return basicCommentChecks(context, event.pullRequest.number)
}

async function planPublishedComment(context: RunContext): Promise<CommentPlan> {
  const { inputs, event, repository } = context
  if (!inputs.isCommentWanted) return { skipped: "input 'comment' is false" }
  if (event.pullRequest) return basicCommentChecks(context, event.pullRequest.number)
  const run = event.workflowRun
  if (run === null) return { skipped: `a ${event.name || 'run without an event'} names no pull request` }
  if (run.event !== 'pull_request' && run.event !== 'pull_request_target') {
    return { skipped: `the workflow run being published was started by '${run.event}', not by a pull request` }
  }
  const checked = basicCommentChecks(context, 0)
  if ('skipped' in checked || repository === null) return checked
  return { issueNumber: await findPullRequest(context.github(), repository, run) }
}

function basicCommentChecks(context: RunContext, issueNumber: number): CommentPlan {
  if (context.repository === null) return { skipped: 'GITHUB_REPOSITORY is not set' }
  if (context.inputs.token === '') return { skipped: "input 'token' is empty" }
  return { issueNumber }
}

function refuseForkCode(inputs: ActionInputs, event: EventInfo) {
  if (!event.isPrivileged || !event.isHeadFromFork || inputs.isForkCodeAllowed) return
  throw new UserError(
    `Refusing to run the check on a head from a fork under ${event.name}: the check runs the repository's ` +
      'prepare and training commands, and this job holds a write token and the repository secrets, so ' +
      "code from a stranger's branch would run with them.",
    "Run the check in a pull_request workflow and publish its report with 'mode: publish' from a workflow_run " +
      "workflow (docs/action.md), or set 'allow-fork-code: true' on this step if you accept that risk.",
  )
}

interface Outcome {
  readonly report: GateReport
  readonly failure: unknown
  readonly plan: CommentPlan
  /** A second place to write the JSON report (check mode's 'report' input). */
  readonly extraJson: string | null
}

async function finish(context: RunContext, outcome: Outcome): Promise<void> {
  const { deps, outputDirectory } = context
  const { core } = deps
  const { plan } = outcome
  // Nothing written or posted may hold a secret, whatever a command or a file put into the report.
  const report = fitReportLimits(redactDeep(outcome.report))
  const failure = outcome.failure
  const json = `${JSON.stringify(report, null, 2)}\n`
  const fullMarkdown = renderMarkdown(report, { maxTableRows: 100_000, maxCharacters: summaryMaxCharacters, marker: commentMarker })
  const jsonPath = join(outputDirectory, 'report.json')
  const markdownPath = join(outputDirectory, 'report.md')
  const htmlPath = join(outputDirectory, 'report.html')
  await writeText(jsonPath, json)
  await writeText(markdownPath, fullMarkdown)
  await writeText(htmlPath, renderHtml(report))
  if (outcome.extraJson !== null) await writeText(outcome.extraJson, json)
  core.info(`Wrote ${jsonPath}, ${markdownPath} and ${htmlPath}${outcome.extraJson ? ` and ${outcome.extraJson}` : ''}.`)
  const htmlReportUrl = await uploadHtmlReport(context, htmlPath)

  let commentProblem: string | null = null
  if ('issueNumber' in plan && context.repository) {
    const body = renderMarkdown(report, { maxCharacters: commentMaxCharacters, marker: commentMarker, ...(htmlReportUrl ? { htmlReportUrl } : {}) })
    try {
      const posted = await upsertComment(context.github(), { ...context.repository, issueNumber: plan.issueNumber }, body, commentMarker)
      core.info(`${posted.action === 'created' ? 'Created' : 'Updated'} the comment on #${plan.issueNumber}: ${posted.url}`)
    } catch (error) {
      const status = (error as { status?: number }).status
      commentProblem = redactSecrets(`${error instanceof Error ? error.message : String(error)}${status ? ` (HTTP ${status})` : ''}`)
      core.warning(
        `Could not post the pull-request comment on #${plan.issueNumber}: ${commentProblem}. The verdict (${report.verdict}) is unchanged; the full report is in the job summary and in ${jsonPath}.`,
      )
    }
  } else if ('skipped' in plan) {
    core.info(`No pull-request comment: ${plan.skipped}.`)
  }

  const note =
    commentProblem === null
      ? ''
      : `> [!WARNING]\n> The pull-request comment could not be posted: ${escapeMarkdownText(commentProblem)}. The report below is the verdict.\n\n`
  try {
    await core.appendSummary(`${note}${fullMarkdown}\n`)
  } catch (error) {
    core.info(`No job summary written: ${error instanceof Error ? error.message : String(error)}`)
  }

  const counts = { block: 0, warn: 0, info: 0 }
  for (const finding of report.findings) counts[finding.severity] += 1
  core.setOutput('verdict', report.verdict)
  core.setOutput('blocking', String(counts.block))
  core.setOutput('warnings', String(counts.warn))
  core.setOutput('infos', String(counts.info))
  core.setOutput('report-json', jsonPath)
  core.setOutput('report-markdown', markdownPath)
  core.setOutput('report-html', htmlPath)

  if (failure !== null) core.setFailed(redactSecrets(`${report.headline}\n${describeFailure(failure)}`))
  else if (report.verdict === 'error') core.setFailed(`${report.headline}\n${report.findings[0]?.message ?? ''}`.trim())
  else if (isFailingVerdict(report.verdict, context.inputs.failOn)) core.setFailed(report.headline)
}

/**
 * Uploads the HTML report as the `html-report` artifact and returns the address of the artifact on
 * the run's page, or null: no name, no uploader, no runtime (a run outside Actions), or a failed
 * upload, which only warns. The address is https only (the comment links nothing else).
 */
async function uploadHtmlReport(context: RunContext, htmlPath: string): Promise<string | null> {
  const { deps, inputs, repository } = context
  const { core, env } = deps
  if (inputs.htmlArtifact === null || !deps.uploadArtifact) return null
  if (!env.ACTIONS_RUNTIME_TOKEN || !env.ACTIONS_RESULTS_URL) {
    core.info(`No HTML report artifact: this run has no Actions runtime (ACTIONS_RUNTIME_TOKEN, ACTIONS_RESULTS_URL). The report is at ${htmlPath}.`)
    return null
  }
  try {
    const uploaded = await deps.uploadArtifact(inputs.htmlArtifact, htmlPath, dirname(htmlPath))
    core.info(`Uploaded the HTML report as the artifact '${inputs.htmlArtifact}'${uploaded.id === undefined ? '' : ` (id ${uploaded.id})`}.`)
    const server = (env.GITHUB_SERVER_URL || 'https://github.com').replace(/\/+$/, '')
    const runId = env.GITHUB_RUN_ID ?? ''
    if (uploaded.id === undefined || repository === null || !/^\d+$/.test(runId) || !server.startsWith('https://')) return null
    return `${server}/${repository.owner}/${repository.repo}/actions/runs/${runId}/artifacts/${uploaded.id}`
  } catch (error) {
    core.warning(
      `Could not upload the HTML report as the artifact '${inputs.htmlArtifact}': ${error instanceof Error ? error.message : String(error)}. ` +
        `The verdict is unchanged; the comment has no link to it, and the file is at ${htmlPath}.`,
    )
    return null
  }
}

/** The 'error' report of a run that reached no verdict. */
function failedRunReport(error: unknown, policySource: string): GateReport {
  return errorReport({ message: describeFailure(error), isUserError: error instanceof UserError, toolVersion, policySource })
}

async function writeText(path: string, text: string) {
  await makeFolder(dirname(path))
  await writeFile(path, text)
}

function readRepository(env: Readonly<Record<string, string | undefined>>) {
  const slug = env.GITHUB_REPOSITORY ?? ''
  const match = slug.match(/^([^/\s]+)\/([^/\s]+)$/)
  return match ? { owner: match[1], repo: match[2], slug } : null
}

/** The event payload as the runner wrote it; {} when there is none (the action run by hand). */
async function readEventPayload(path: string | undefined): Promise<unknown> {
  if (!path) return {}
  const fix = 'Run the action on a GitHub Actions runner, or unset GITHUB_EVENT_PATH.'
  const bytes = await readRegularFile(path, {
    maxBytes: readLimits.event,
    what: 'event payload',
    name: `GITHUB_EVENT_PATH (${path})`,
    missing: () => new UserError(`GITHUB_EVENT_PATH names ${path}, which cannot be read.`, fix),
    limitFix: fix,
  })
  const text = bytes.toString('utf8')
  if (boundNesting(text, maxReportNesting) !== null) throw new UserError(`The event payload at ${path} nests deeper than ${maxReportNesting} levels.`, fix)
  try {
    return JSON.parse(text)
  } catch {
    throw new UserError(`The event payload at ${path} is not valid JSON.`, fix)
  }
}

function progressLogger(core: ActionCore, started: number) {
  const elapsed = () => `${((performance.now() - started) / 1000).toFixed(1)} s`
  return (event: GateProgress) => {
    if (event.stage === 'refit') core.info(`[${elapsed()}] ${event.side}: refit ${event.refit + 1} of ${event.of}`)
    else if (event.stage === 'single-feature') core.info(`[${elapsed()}] ${event.side}: one-feature models for ${event.features} features`)
    else core.info(`[${elapsed()}] checks`)
  }
}
