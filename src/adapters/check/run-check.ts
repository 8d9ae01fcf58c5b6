import { readFile } from 'node:fs/promises'
import { isAbsolute, join, relative, resolve } from 'node:path'
import type { GateConfig } from '../../core/config.ts'
import type { Dataset } from '../../core/data/dataset.ts'
import { schemaOf } from '../../core/data/parse-csv.ts'
import { splitRows } from '../../core/data/split-rows.ts'
import { UserError } from '../../core/errors.ts'
import { createBuiltinFit } from '../../core/models/builtin-fit.ts'
import { parsePolicy, checkPolicyAgainstColumns } from '../../core/policy/parse-policy.ts'
import type { GateReport } from '../../core/report/report.ts'
import { runGate, type GateProgress, type SideInputs } from '../../core/run-gate.ts'
import { builtinLearnerSettings } from '../../core/gate-settings.ts'
import { readDataset } from '../files/read-dataset.ts'
import { addWorktree, defaultBase, readFileAtCommit, repositoryRoot, resolveCommit } from '../git/git.ts'
import { runPrepare } from './run-prepare.ts'
import { loadSideModel } from './load-side-model.ts'
import { toolVersion } from '../version.ts'
import { createPoolMeasure } from '../parallel/create-pool-measure.ts'

export interface CheckRequest {
  /** Where the user ran plumbline; the repository is found from here. */
  readonly cwd: string
  /** Policy path relative to the repository root (default plumbline.yml). */
  readonly policyPath?: string
  /** Baseline ref (default: merge base with the default branch). */
  readonly baseRef?: string
  /** Candidate ref (default: the working tree). */
  readonly headRef?: string
  readonly log?: (line: string) => void
  readonly onProgress?: (event: GateProgress) => void
}

/**
 * The whole check as the CLI and the action run it: read the head's policy, check out the base (and
 * a head ref, if given) into temporary worktrees, run `prepare` on each side, read each side's data,
 * set up refits or load models, and make the one pure call `runGate`. Worktrees are removed on every
 * path out, failures included.
 */
export async function runCheck(request: CheckRequest): Promise<GateReport> {
  const log = request.log ?? (() => undefined)
  const root = await repositoryRoot(request.cwd)
  const policyPath = request.policyPath ?? 'plumbline.yml'
  const cleanups: (() => Promise<void>)[] = []
  try {
    const head = request.headRef
      ? await checkoutSide(root, request.headRef, '--head', cleanups)
      : { path: root, ref: 'working tree', commit: null as string | null }
    const policyFile = join(head.path, policyPath)
    const policyText = await readFile(policyFile, 'utf8').catch(() => {
      throw new UserError(
        `No policy file at ${policyPath} (looked in ${head.path}).`,
        "Create one with 'plumbline init', or pass --policy PATH (the action's 'policy' input).",
      )
    })
    const config = parsePolicy(policyText, { source: policyPath })
    const baseTarget = request.baseRef
      ? { ref: request.baseRef, commit: await resolveCommit(root, request.baseRef, '--base') }
      : await defaultBase(root)
    const basePolicy = await readFileAtCommit(root, baseTarget.commit, toRepoPath(policyPath))
    const policyChanged = basePolicy !== policyText
    log(`Base: ${baseTarget.ref} (${baseTarget.commit.slice(0, 12)}); head: ${head.ref}${head.commit ? ` (${head.commit.slice(0, 12)})` : ''}`)
    log(`Policy: ${policyPath} from the head${policyChanged ? ' (changed in this pull request)' : ''}`)

    const baseTree = await addWorktree(root, baseTarget.commit)
    cleanups.push(baseTree.remove)
    const baseSide = await loadSide(config, baseTree.path, 'base', baseTarget.ref, baseTarget.commit, policyPath, log)
    const headSide = await loadSide(config, head.path, 'head', head.ref, head.commit, policyPath, log)
    // Every built-in refit of both sides runs on a pool of worker threads sized to the cores.
    const pool = createPoolMeasure(process.env)
    if (pool) cleanups.push(pool.close)
    return await runGate({
      config,
      policySource: policyPath,
      policyChanged,
      base: baseSide,
      head: headSide,
      toolVersion,
      onProgress: request.onProgress,
      measureSides: pool?.measureSides,
      now: () => performance.now() / 1000,
    })
  } finally {
    for (const cleanup of cleanups.reverse()) await cleanup()
  }
}

async function checkoutSide(root: string, ref: string, flag: string, cleanups: (() => Promise<void>)[]) {
  const commit = await resolveCommit(root, ref, flag)
  const tree = await addWorktree(root, commit)
  cleanups.push(tree.remove)
  return { path: tree.path, ref, commit }
}

async function loadSide(
  config: GateConfig,
  checkout: string,
  side: 'base' | 'head',
  ref: string,
  commit: string | null,
  policyPath: string,
  log: (line: string) => void,
): Promise<SideInputs> {
  if (config.prepare) {
    log(`${side}: running prepare: ${config.prepare.command}`)
    await runPrepare({ command: config.prepare.command, cwd: checkout, timeoutSeconds: config.prepare.timeoutSeconds, side })
  }
  const roles = config.data.columns
  const readOptions = { target: config.target, task: config.task, roles, cwd: checkout }
  const all = await readDataset(config.data.train, { ...readOptions, source: `${side}:${config.data.train}`, requireTarget: true })
  let train: Dataset
  let holdout: Dataset
  if (config.data.holdout.kind === 'split') {
    const split = splitRows(all, { fraction: config.data.holdout.fraction, seed: config.seed, by: config.data.holdout.by })
    train = split.train
    holdout = split.holdout
  } else {
    train = all
    holdout = await readDataset(config.data.holdout.path, {
      ...readOptions,
      source: `${side}:${config.data.holdout.path}`,
      schema: schemaOf(all),
      requireTarget: true,
    })
  }
  checkPolicyAgainstColumns(config, [...train.features.map((f) => f.name), ...(train.ids ? [train.ids.name] : [])], policyPath)
  let reference = train as Dataset
  if (config.data.reference.kind === 'holdout') reference = holdout
  if (config.data.reference.kind === 'file') {
    reference = await readDataset(config.data.reference.path, {
      ...readOptions,
      source: `${side}:${config.data.reference.path}`,
      schema: schemaOf(train),
      requireTarget: false,
    })
  }
  log(`${side}: ${train.rows} training rows, ${holdout.rows} holdout rows, ${train.features.length} features`)
  if (config.model.kind === 'builtin') {
    const settings = builtinLearnerSettings(config)
    return { ref, commit, train, holdout, reference, fit: createBuiltinFit(train, config.task, settings), builtin: { task: config.task, settings } }
  }
  const loaded = await loadSideModel(config, { checkout, side, train, holdout, log })
  return { ref, commit, train, holdout, reference, ...loaded }
}

function toRepoPath(path: string): string {
  return (isAbsolute(path) ? relative(resolve('/'), path) : path).split('\\').join('/')
}
