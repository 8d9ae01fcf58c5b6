import { isAbsolute, relative, resolve } from 'node:path'
import type { GateConfig } from '../../core/config.ts'
import type { Dataset } from '../../core/data/dataset.ts'
import { schemaOf } from '../../core/data/parse-csv.ts'
import { assembleSideData, sideDataFiles, type DataFileRequest } from '../../core/data/side-data.ts'
import { UserError } from '../../core/errors.ts'
import { readPolicyFile, checkPolicyAgainstColumns, type PolicyFile } from '../../core/policy/parse-policy.ts'
import type { GateReport } from '../../core/report/report.ts'
import { runGate, type GateProgress, type SideInputs } from '../../core/run-gate.ts'
import { executeInProcess, measureSidesWith, type ExecuteUnits } from '../../core/gate/work-units.ts'
import { readDataset } from '../files/read-dataset.ts'
import { readConfinedFile, readLimits } from '../files/confined-file.ts'
import { readTable } from '../files/read-table.ts'
import { addWorktree, defaultBase, readFileAtCommit, repositoryRoot, resolveCommit } from '../git/git.ts'
import { runPrepare } from './run-prepare.ts'
import { loadSideModel } from './load-side-model.ts'
import { toolVersion } from '../version.ts'
import { createPoolMeasure } from '../parallel/create-pool-measure.ts'
import { sideDataDigest, type SideCacheIdentity } from './input-digest.ts'
import { createUnitCache, type UnitCache, type UnitCacheStore } from './unit-cache.ts'

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
  /** A folder of measured work units (--cache): reused when their digest matches, written otherwise. */
  readonly cache?: string
  /** With `cache`: where entries are also kept between machines (the action's @actions/cache). */
  readonly cacheStore?: UnitCacheStore
}

/** Both sides read and ready to measure, with what their digests need. */
export interface OpenedCheck {
  readonly root: string
  readonly policy: PolicyFile
  readonly policyPath: string
  readonly policyText: string
  readonly policyChanged: boolean
  readonly base: SideInputs
  readonly head: SideInputs
  /** Per side: what its units' cache keys rest on. */
  readonly identities: { readonly base: SideCacheIdentity | 'uncacheable'; readonly head: SideCacheIdentity | 'uncacheable' }
  /** Registers a cleanup run when the check is done (worktrees, the pool). */
  readonly onClose: (cleanup: () => Promise<void>) => void
}

/**
 * The whole check as the CLI and the action run it: read the head's policy, check out the base (and
 * a head ref, if given) into temporary worktrees, run `prepare` on each side, read each side's data,
 * set up refits or load models, and make the one pure call `runGate`. Worktrees are removed on every
 * path out, failures included.
 */
export async function runCheck(request: CheckRequest): Promise<GateReport> {
  return withOpenedCheck(request, async (opened) => {
    const measure = await localExecutor(opened, request.cache, request.cacheStore)
    const report = await gateOf(opened, request, measure.execute)
    return measure.cache ? { ...report, cache: measure.cache.used } : report
  })
}

/** runGate on the opened sides with every unit run by `execute`. */
export function gateOf(opened: OpenedCheck, request: Pick<CheckRequest, 'onProgress'>, execute: ExecuteUnits): Promise<GateReport> {
  return runGate({
    config: opened.policy.config,
    policySource: opened.policyPath,
    policyChanged: opened.policyChanged,
    base: opened.base,
    head: opened.head,
    toolVersion,
    onProgress: request.onProgress,
    measureSides: measureSidesWith(execute),
    now: () => performance.now() / 1000,
  })
}

/**
 * Where this machine runs units: every built-in refit of both sides on a pool of worker threads
 * sized to the cores (in this thread when there is one core), behind the unit cache with --cache.
 */
export async function localExecutor(opened: OpenedCheck, cache: string | undefined, store?: UnitCacheStore): Promise<{ execute: ExecuteUnits; cache?: UnitCache }> {
  const pool = createPoolMeasure(process.env)
  if (pool) opened.onClose(pool.close)
  const execute = pool?.execute ?? executeInProcess
  if (!cache) return { execute }
  const unitCache = await createUnitCache({ directory: resolve(cache), ...(store ? { store } : {}), toolVersion, identities: opened.identities, execute })
  return { execute: unitCache.execute, cache: unitCache }
}

/** Opens both sides (worktrees, prepare, data, models), runs `body`, and cleans up on every path out. */
export async function withOpenedCheck<T>(request: Omit<CheckRequest, 'onProgress'>, body: (opened: OpenedCheck) => Promise<T>): Promise<T> {
  const log = request.log ?? (() => undefined)
  const root = await repositoryRoot(request.cwd)
  const policyPath = request.policyPath ?? 'plumbline.yml'
  const cleanups: (() => Promise<void>)[] = []
  try {
    const head = request.headRef
      ? await checkoutSide(root, request.headRef, '--head', cleanups)
      : { path: root, ref: 'working tree', commit: null as string | null }
    const policyText = (
      await readConfinedFile(
        { key: 'The policy file', path: policyPath, root: head.path, rootName: `the head checkout (${head.path})` },
        {
          maxBytes: readLimits.policy,
          what: 'policy',
          missing: () =>
            new UserError(
              `No policy file at ${policyPath} (looked in ${head.path}).`,
              "Create one with 'plumbline init', or pass --policy PATH (the action's 'policy' input).",
            ),
          limitFix: 'A plumbline.yml is a few dozen lines; check that --policy (the action\'s \'policy\' input) names it.',
        },
      )
    ).toString('utf8')
    const policy = readPolicyFile(policyText, { source: policyPath })
    const baseTarget = request.baseRef
      ? { ref: request.baseRef, commit: await resolveCommit(root, request.baseRef, '--base') }
      : await defaultBase(root)
    const basePolicy = await readFileAtCommit(root, baseTarget.commit, toRepoPath(policyPath))
    const policyChanged = basePolicy !== policyText
    log(`Base: ${baseTarget.ref} (${baseTarget.commit.slice(0, 12)}); head: ${head.ref}${head.commit ? ` (${head.commit.slice(0, 12)})` : ''}`)
    log(`Policy: ${policyPath} from the head${policyChanged ? ' (changed in this pull request)' : ''}`)

    const baseTree = await addWorktree(root, baseTarget.commit)
    cleanups.push(baseTree.remove)
    const baseSide = await loadSide(policy, baseTree.path, 'base', baseTarget.ref, baseTarget.commit, policyPath, log)
    const headSide = await loadSide(policy, head.path, 'head', head.ref, head.commit, policyPath, log)
    checkPolicyAgainstColumns(policy, columnsOf(headSide.train), { otherSide: columnsOf(baseSide.train) })
    const identity = (side: SideInputs): SideCacheIdentity | 'uncacheable' => {
      if (side.model.kind === 'builtin') return { data: sideDataDigest(side), code: null }
      return side.commit ? { data: sideDataDigest(side), code: { commit: side.commit, model: policy.config.model } } : 'uncacheable'
    }
    return await body({
      root,
      policy,
      policyPath,
      policyText,
      policyChanged,
      base: baseSide,
      head: headSide,
      identities: { base: identity(baseSide), head: identity(headSide) },
      onClose: (cleanup) => void cleanups.push(cleanup),
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
  policy: PolicyFile,
  checkout: string,
  side: 'base' | 'head',
  ref: string,
  commit: string | null,
  policyPath: string,
  log: (line: string) => void,
): Promise<SideInputs> {
  const { config } = policy
  if (config.prepare) {
    log(`${side}: running prepare: ${config.prepare.command}`)
    await runPrepare({ command: config.prepare.command, cwd: checkout, timeoutSeconds: config.prepare.timeoutSeconds, side })
  }
  const readOptions = { target: config.target, task: config.task, roles: config.data.columns, cwd: checkout, rootName: `the ${side} checkout`, featureRolesMayBeAbsent: true }
  const tables: Partial<Record<DataFileRequest['role'], Dataset>> = {}
  for (const file of sideDataFiles(config)) {
    tables[file.role] = await readTable(file.path, {
      ...readOptions,
      key: file.key,
      source: `${side}: ${file.path}`,
      requireTarget: file.requireTarget,
      ...(file.conformToTrain ? { schema: schemaOf(tables.train!) } : {}),
    })
  }
  const { train, holdout, reference, unlabeled } = assembleSideData(config, tables)
  checkSizes(side, config, train, holdout, log)
  const capNote = (rows: number, max: number, key: string) => (rows > max ? ` (a sample of ${max} by ${key})` : '')
  log(
    `${side}: ${train.rows} training rows${capNote(train.rows, config.data.maxTrainRows, 'data.max_train_rows')}, ` +
      `${holdout.rows} holdout rows${capNote(holdout.rows, config.data.maxHoldoutRows, 'data.max_holdout_rows')}, ${train.features.length} features`,
  )
  const model = config.model.kind === 'builtin' ? { kind: 'builtin' as const } : await loadSideModel(config, { checkout, side, train, holdout, log })
  return { ref, commit, train, holdout, reference, ...(unlabeled ? { unlabeled } : {}), model }
}

/** Fewer rows than this cannot give a noise floor worth reading (common practice, not a published bound). */
const minimumRows = { train: 20, holdout: 10 } as const
/** Below these, the gate runs but says that its numbers rest on few rows. */
const smallRows = { train: 200, holdout: 100 } as const

function checkSizes(side: string, config: GateConfig, train: Dataset, holdout: Dataset, log: (line: string) => void) {
  if (train.features.length === 0) {
    throw new UserError(
      `${side}: ${config.data.train} has no feature column: every column is the target, the id or ignored.`,
      "Add the feature columns to the file, or change their roles under 'data.columns' in the policy.",
    )
  }
  const holdoutName = config.data.holdout.kind === 'file' ? config.data.holdout.path : `the split of ${config.data.train}`
  for (const [which, data, name] of [['train', train, config.data.train], ['holdout', holdout, holdoutName]] as const) {
    if (data.rows < minimumRows[which]) {
      throw new UserError(
        `${side}: ${name} has ${data.rows} ${which === 'train' ? 'training' : 'holdout'} row${data.rows === 1 ? '' : 's'}; the gate needs at least ${minimumRows[which]} to measure importance against a noise floor.`,
        which === 'train' ? 'Point data.train at the full training table.' : "Give the holdout more rows (data.holdout), or a larger 'fraction' for a split.",
      )
    }
    if (data.rows < smallRows[which]) {
      log(`${side}: note: only ${data.rows} ${which === 'train' ? 'training' : 'holdout'} rows; with so few, the noise floor is wide and small changes cannot be told from noise.`)
    }
  }
}

function columnsOf(train: Dataset): string[] {
  return [...train.features.map((f) => f.name), ...(train.ids ? [train.ids.name] : [])]
}

function toRepoPath(path: string): string {
  return (isAbsolute(path) ? relative(resolve('/'), path) : path).split('\\').join('/')
}
