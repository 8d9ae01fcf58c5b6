/**
 * `plumbline plan`, `shard` and `merge`: the check's work units spread over separate machines (a CI
 * job matrix), each step opening both sides exactly as `check` does (withOpenedCheck), so that every
 * step plans the same units from the same inputs.
 * - plan: the units of the first stage split into N shards balanced by estimated cost, and the
 *   matrix for the workflow.
 * - shard I of N: runs its share of a stage and writes a partial result file with the digest of
 *   the inputs. The refits stage needs nothing else; the drop-columns stage reads every refits
 *   partial file (`--after`), because its candidates are ranked by the refits' importances.
 * - merge: reads every partial file, refuses one whose digest differs from these inputs, a unit
 *   given twice, a unit missing and a unit not in the plan, each by name, and runs the gate on the
 *   results: the same combination as a check on one machine, so the same report.
 */
import { readdir, readFile, realpath, rename, rm, stat, writeFile } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { UserError } from '../../core/errors.ts'
import { planMeasurement } from '../../core/gate/plan-measurement.ts'
import { encodeUnit, partialFormat, readPartialFile, type DecodedPartial, type DecodedUnit, type InputDigests, type PartialFile } from '../../core/gate/unit-files.ts'
import {
  assignShards,
  combineSides,
  planDropColumnUnits,
  planRefitUnits,
  unitContext,
  type ExecuteUnits,
  type UnitContext,
  type UnitStage,
  type WorkUnit,
} from '../../core/gate/work-units.ts'
import type { GateReport } from '../../core/report/report.ts'
import { toolVersion } from '../version.ts'
import { digestOfInputs, inputDigests } from './input-digest.ts'
import { gateOf, localExecutor, withOpenedCheck, type CheckRequest, type OpenedCheck } from './run-check.ts'
import { makeFolder } from '../files/make-folder.ts'

/** Partial files larger than this are refused before reading (a crafted file cannot exhaust memory). */
const maxPartialBytes = 1024 * 1024 * 1024

function digestsOf(opened: OpenedCheck): { inputs: InputDigests; digest: string } {
  const inputs = inputDigests({ toolVersion, policyText: opened.policyText, base: opened.base, head: opened.head })
  return { inputs, digest: digestOfInputs(inputs) }
}

function contextOf(opened: OpenedCheck): UnitContext {
  return unitContext(planMeasurement({ config: opened.policy.config, base: opened.base, head: opened.head }).jobs)
}

export interface ShardPlan {
  /** For strategy.matrix: `{"shard": [1, ..., N]}`. */
  readonly matrix: { readonly shard: readonly number[] }
  readonly file: {
    readonly format: 'plumbline-plan'
    readonly version: 1
    readonly digest: string
    readonly shards: number
    readonly stages: readonly unknown[]
  }
  /** One line per shard: its units and share of the estimated cost. */
  readonly summary: readonly string[]
}

export function runPlan(request: Omit<CheckRequest, 'onProgress' | 'cache' | 'cacheStore'> & { readonly shards: number }): Promise<ShardPlan> {
  return withOpenedCheck(request, async (opened) => {
    const context = contextOf(opened)
    const units = planRefitUnits(context)
    const shards = assignShards(units, request.shards)
    const total = units.reduce((sum, u) => sum + u.cost, 0)
    const dropColumns = Object.fromEntries(
      context.jobs.map((job) => [
        job.inputs.side,
        job.inputs.model || !job.options.dropColumns || units.filter((u) => u.side === job.inputs.side).length < 2
          ? null
          : { refits: units.filter((u) => u.side === job.inputs.side).length, top: job.options.dropColumns.top, also: job.options.dropColumns.also },
      ]),
    )
    return {
      matrix: { shard: shards.map((_, s) => s + 1) },
      file: {
        format: 'plumbline-plan',
        version: 1,
        digest: digestsOf(opened).digest,
        shards: request.shards,
        stages: [
          { stage: 'refits', units: shards.flatMap((list, s) => list.map((u) => ({ id: u.id, shard: s + 1, cost: u.cost }))) },
          { stage: 'drop-columns', decidedAfter: 'refits', perSide: dropColumns },
        ],
      },
      summary: shards.map((list, s) => {
        const cost = list.reduce((sum, u) => sum + u.cost, 0)
        return `shard ${s + 1} of ${request.shards}: ${list.length} refit unit${list.length === 1 ? '' : 's'} (${total > 0 ? ((100 * cost) / total).toFixed(0) : '0'}% of the estimated cost)${list.length > 0 ? `: ${list.map((u) => u.id).join(', ')}` : ''}`
      }),
    }
  })
}

export interface ShardResult {
  readonly path: string
  readonly stage: UnitStage
  readonly units: readonly string[]
  readonly reused: readonly string[]
}

export function runShard(
  request: Omit<CheckRequest, 'onProgress'> & { readonly index: number; readonly of: number; readonly out: string; readonly after?: readonly string[] },
): Promise<ShardResult> {
  return withOpenedCheck(request, async (opened) => {
    const { inputs, digest } = digestsOf(opened)
    const context = contextOf(opened)
    const refits = planRefitUnits(context)
    let stage: UnitStage = 'refits'
    let units: readonly WorkUnit[] = refits
    if (request.after) {
      stage = 'drop-columns'
      const partials = await readPartials(await listPartialFiles(request.after, request.cwd), inputs, digest)
      const lookup = partialLookup(partials, 'refits')
      const combined = combineSides(context, refits, await lookup.execute(refits, context))
      lookup.refuseUnused()
      units = planDropColumnUnits(context, combined)
    }
    const mine = assignShards(units, request.of)[request.index - 1]
    const local = await localExecutor(opened, request.cache, request.cacheStore)
    const results = mine.length > 0 ? await local.execute(mine, context) : []
    const file: PartialFile = {
      ...partialFormat,
      digest,
      inputs,
      shard: { stage, index: request.index, of: request.of },
      units: mine.map((unit, k) => encodeUnit(unit, results[k])),
    }
    const path = await writePartial(resolve(request.cwd, request.out), `plumbline-partial-${stage}-${request.index}-of-${request.of}.json`, file)
    return { path, stage, units: mine.map((u) => u.id), reused: local.cache?.used.reused ?? [] }
  })
}

/** The gate on the units of every partial file under `dirs`; refuses incomplete, duplicated or foreign work. */
export async function runMerge(request: Omit<CheckRequest, 'cache' | 'cacheStore'> & { readonly dirs: readonly string[] }): Promise<GateReport> {
  // The partial files are listed before both sides are opened, so a folder that is missing, empty or
  // given twice is refused in a moment, not after the checkouts and the data are read.
  const files = await listPartialFiles(request.dirs, request.cwd)
  return withOpenedCheck(request, async (opened) => {
    const { inputs, digest } = digestsOf(opened)
    const partials = await readPartials(files, inputs, digest)
    const lookup = partialLookup(partials)
    const report = await gateOf(opened, request, lookup.execute)
    lookup.refuseUnused()
    return report
  })
}

interface ReadPartial {
  readonly source: string
  readonly file: DecodedPartial
}

/** Every partial file in the folders (or the files) named, each checked against these inputs' digest. */
async function listPartialFiles(paths: readonly string[], cwd: string): Promise<string[]> {
  const files: string[] = []
  const givenAs = new Map<string, string>()
  const add = async (path: string, given: string) => {
    const real = await realpath(path)
    const earlier = givenAs.get(real)
    if (earlier !== undefined) {
      throw new UserError(
        `${real} is given twice (through ${earlier} and ${given}); each partial result may be merged once.`,
        'Pass each shard\'s folder once.',
      )
    }
    givenAs.set(real, given)
    files.push(path)
  }
  for (const given of paths) {
    const path = resolve(cwd, given)
    const info = await stat(path).catch(() => null)
    if (!info) throw new UserError(`No folder or file ${given} (looked at ${path}).`, 'Pass the folders plumbline shard --out wrote (the downloaded artifacts).')
    if (info.isFile()) {
      await add(path, given)
      continue
    }
    const names = (await readdir(path)).filter((n) => n.startsWith('plumbline-partial-') && n.endsWith('.json')).sort()
    if (names.length === 0) {
      throw new UserError(`${given} holds no partial result file (plumbline-partial-*.json).`, 'Pass the folders plumbline shard --out wrote (the downloaded artifacts).')
    }
    for (const n of names) await add(join(path, n), given)
  }
  return files
}

async function readPartials(files: readonly string[], inputs: InputDigests, digest: string): Promise<ReadPartial[]> {
  const read: ReadPartial[] = []
  for (const path of files) {
    const size = (await stat(path)).size
    if (size > maxPartialBytes) throw new UserError(`${path} is ${size} bytes, more than a partial result file can be (${maxPartialBytes}).`, 'Pass the files plumbline shard wrote.')
    const file = readPartialFile(await readFile(path, 'utf8'), path)
    refuseForeignInputs(file, path, inputs, digest)
    read.push({ source: path, file })
  }
  return read
}

function refuseForeignInputs(file: DecodedPartial, source: string, inputs: InputDigests, digest: string) {
  if (file.digest === digest && digestOfInputs(file.inputs) === digest) return
  const theirs = file.inputs
  const differs =
    theirs.toolVersion !== inputs.toolVersion
      ? `plumbline ${theirs.toolVersion} wrote it; this is plumbline ${inputs.toolVersion}`
      : theirs.policy !== inputs.policy
        ? 'it was measured with another policy file'
        : theirs.base.commit !== inputs.base.commit
          ? `it was measured on base commit ${theirs.base.commit ?? '(a working tree)'}, this run's base is ${inputs.base.commit ?? '(a working tree)'}`
          : theirs.head.commit !== inputs.head.commit
            ? `it was measured on head commit ${theirs.head.commit ?? '(a working tree)'}, this run's head is ${inputs.head.commit ?? '(a working tree)'}`
            : theirs.base.data !== inputs.base.data
              ? "the base side's data differs from what this run read"
              : theirs.head.data !== inputs.head.data
                ? "the head side's data differs from what this run read"
                : 'its digest does not match its inputs'
  throw new UserError(
    `${source} is from another run: ${differs}. No report was written.`,
    'Run plan, every shard and merge on the same commits, policy and plumbline version.',
  )
}

/** The units of the partial files (of one stage, or all) as an executor; a missing or foreign unit is a UserError naming it. */
function partialLookup(partials: readonly ReadPartial[], only?: UnitStage) {
  const index = new Map<string, { unit: DecodedUnit; source: string; stage: UnitStage }>()
  const shardsOf = new Map<UnitStage, number>()
  for (const { source, file } of partials) {
    if (only && file.shard.stage !== only) continue
    shardsOf.set(file.shard.stage, file.shard.of)
    for (const unit of file.units) {
      const earlier = index.get(unit.id)
      if (earlier) {
        throw new UserError(
          `Unit ${unit.id} is in two partial results: ${earlier.source} and ${source}. No report was written.`,
          'Pass each shard’s folder once, and every folder from the same run.',
        )
      }
      index.set(unit.id, { unit, source, stage: file.shard.stage })
    }
  }
  const used = new Set<string>()
  const execute: ExecuteUnits = async (units) => {
    const stage: UnitStage = units[0] && units[0].kind !== 'refit' ? 'drop-columns' : 'refits'
    const of = shardsOf.get(stage)
    return units.map((unit) => {
      const found = index.get(unit.id)
      if (!found) {
        const owner = of === undefined ? undefined : assignShards(units, of).findIndex((list) => list.includes(unit))
        throw new UserError(
          of === undefined
            ? `Unit ${unit.id} is missing: no partial result file of the ${stage} stage was given. No report was written.`
            : `Unit ${unit.id} is missing: shard ${owner! + 1} of ${of} of the ${stage} stage runs it, and no partial file given has it. No report was written.`,
          stage === 'drop-columns'
            ? 'Run plumbline shard --after <the refits folders> for every shard, and pass those folders too.'
            : 'Pass the folder of every shard; run a shard again if its artifact is missing.',
        )
      }
      const u = found.unit
      const sameSet =
        unit.kind === 'drop-column'
          ? u.feature === unit.feature
          : unit.kind === 'drop-group'
            ? u.group === unit.group && JSON.stringify(u.members) === JSON.stringify(unit.members)
            : true
      if (u.kind !== unit.kind || u.side !== unit.side || u.refit !== unit.refit || u.seed !== unit.seed || !sameSet) {
        throw new UserError(`Unit ${unit.id} in ${found.source} is not the unit this run plans (its seed or kind differ). No report was written.`, 'Run plan, every shard and merge with the same plumbline version.')
      }
      used.add(unit.id)
      return u.result
    })
  }
  return {
    execute,
    /** After the units were asked for: one nobody asked for is foreign work. */
    refuseUnused() {
      for (const [id, found] of index) {
        if (!used.has(id)) {
          throw new UserError(
            `Unit ${id} in ${found.source} is not part of this run's plan. No report was written.`,
            'Pass only the folders of this run’s shards (after a new push, run every shard again).',
          )
        }
      }
    },
  }
}

async function writePartial(folder: string, name: string, file: PartialFile): Promise<string> {
  const path = join(folder, name)
  const temporary = `${path}.${process.pid}.tmp`
  try {
    await makeFolder(folder)
    await writeFile(temporary, `${JSON.stringify(file)}\n`)
    await rename(temporary, path)
  } catch (error) {
    await rm(temporary, { force: true }).catch(() => undefined)
    throw new UserError(
      `Could not write the partial result to ${path}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}.`,
      'Name a folder you can write to, on a disk with room (--out DIR).',
    )
  }
  return path
}
