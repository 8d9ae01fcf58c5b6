import { constants } from 'node:fs'
import { access, rename, rm, stat, writeFile } from 'node:fs/promises'
import { basename, dirname, join } from 'node:path'
import { describeFailure, UserError } from '../../core/errors.ts'
import { errorReport } from '../../core/report/error-report.ts'
import { renderHtml } from '../../core/report/render-html.ts'
import { renderMarkdown } from '../../core/report/render-markdown.ts'
import { fitReportLimits } from '../../core/report/fit-report-limits.ts'
import { renderText } from '../../core/report/render-text.ts'
import type { GateReport } from '../../core/report/report.ts'
import type { GateProgress } from '../../core/run-gate.ts'
import { runCheck } from '../check/run-check.ts'
import { runMerge } from '../check/run-shards.ts'
import { toolVersion } from '../version.ts'
import { resolveConfinedOutput } from '../files/confined-file.ts'
import { redactDeep, registerEnvironmentSecrets } from '../security/secrets.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'
import { parseCommand } from './args.ts'
import type { CliIo } from './cli-io.ts'
import { init } from './init.ts'
import { runShardCommand } from './shard-commands.ts'
import { describeWriteError, makeFolder } from '../files/make-folder.ts'

export type { CliIo }

/** Runs one CLI invocation and returns the exit code: 0 pass/warn, 1 block, 2 user error, 3 internal. */
export async function main(argv: readonly string[], io: CliIo): Promise<number> {
  registerEnvironmentSecrets()
  let command
  try {
    command = parseCommand(argv)
  } catch (error) {
    io.stderr(`${cleanOutsideText(describeFailure(error))}\n`)
    return error instanceof UserError ? 2 : 3
  }
  if (command.name === 'help') {
    io.stdout(`${command.text}\n`)
    return 0
  }
  if (command.name === 'version') {
    io.stdout(`plumbline ${toolVersion}\n`)
    return 0
  }
  try {
    if (command.name === 'init') return await init(command, io)
    if (command.name === 'plan' || command.name === 'shard') return await runShardCommand(command, io)
    const started = performance.now()
    // --quiet: the verdict line and nothing else (errors still reach stderr).
    const progress = command.quiet ? silentProgress : createProgress(io, started)
    let report: GateReport
    // Checked before the run: a --json naming a directory fails in a second, not after the gate.
    await planOutputs(command, io.cwd)
    try {
      const request = {
        cwd: io.cwd,
        policyPath: command.policy,
        baseRef: command.base,
        headRef: command.head,
        log: (line: string) => progress.line(cleanOutsideText(line)),
        onProgress: (event: GateProgress) => progress.event(event),
      }
      report = command.name === 'merge' ? await runMerge({ ...request, dirs: command.dirs }) : await runCheck({ ...request, cache: command.cache })
    } catch (error) {
      progress.done()
      const failed = errorReport({
        message: describeFailure(error),
        isUserError: error instanceof UserError,
        toolVersion,
        policySource: command.policy ?? 'plumbline.yml',
      })
      await writeOutputs(command, failed, io.cwd).catch(() => undefined)
      throw error
    }
    progress.done()
    report = redactDeep(report)
    await writeOutputs(command, report, io.cwd)
    if (command.quiet) {
      io.stdout(cleanOutsideText(`plumbline: ${report.headline}\n`))
    } else {
      io.stdout(`${cleanOutsideText(renderText(report))}\n`)
      io.stderr(`plumbline: ${report.verdict} in ${((performance.now() - started) / 1000).toFixed(1)} s\n`)
    }
    return report.verdict === 'block' ? 1 : 0
  } catch (error) {
    io.stderr(`${cleanOutsideText(describeFailure(error))}\n`)
    return error instanceof UserError ? 2 : 3
  }
}

/** Where --json, --markdown and --html go; a directory or a non-file is refused before anything runs. */
async function planOutputs(command: { json?: string; markdown?: string; html?: string }, cwd: string) {
  const planned: { flag: string; path: string }[] = []
  for (const [flag, path] of [['--json', command.json], ['--markdown', command.markdown], ['--html', command.html]] as const) {
    if (!path) continue
    const full = await resolveConfinedOutput({ key: flag, path, root: cwd, rootName: cwd }, { confine: false })
    // The folder is made (and found writable) now, so a path that cannot be written fails in a second.
    const existing = await stat(full).catch(() => null)
    if (!existing?.isCharacterDevice()) {
      try {
        await makeFolder(dirname(full))
        await access(dirname(full), constants.W_OK)
      } catch (error) {
        throw new UserError(`Could not write ${flag} ${path}: ${describeWriteError(error)}.`, `Name a file in a folder you can write to (${flag} FILE).`)
      }
    }
    planned.push({ flag, path: full })
  }
  return planned
}

/**
 * Writes --json, --markdown and --html all or nothing: each regular file is written beside its target first
 * and renamed into place only when every output was written (a device such as /dev/stdout is written
 * directly, before the renames). So a run whose markdown cannot be written (/dev/full, a full disk)
 * leaves no report file claiming a verdict, and exits 2 saying which output failed.
 */
async function writeOutputs(command: { json?: string; markdown?: string; html?: string }, full: GateReport, cwd: string) {
  // Within the limits the action's publish mode reads, and without secrets (the error path too).
  const report = fitReportLimits(redactDeep(full))
  const texts: Record<string, string> = {
    '--json': `${JSON.stringify(report, null, 2)}\n`,
    '--markdown': renderMarkdown(report),
    '--html': renderHtml(report),
  }
  const staged: { temporary: string; path: string }[] = []
  try {
    for (const { flag, path } of await planOutputs(command, cwd)) {
      const existing = await stat(path).catch(() => null)
      try {
        if (existing && !existing.isFile()) {
          await writeFile(path, texts[flag])
          continue
        }
        // planOutputs above made the folder.
        const temporary = join(dirname(path), `.${basename(path)}.plumbline-${process.pid}.tmp`)
        staged.push({ temporary, path })
        await writeFile(temporary, texts[flag])
      } catch (error) {
        throw new UserError(
          `Could not write ${flag} ${path}: ${describeWriteError(error)}. No report file was written.`,
          `Name a file in a folder you can write to, on a disk with room (${flag} FILE).`,
        )
      }
    }
    for (const { temporary, path } of staged) await rename(temporary, path)
    staged.length = 0
  } finally {
    for (const { temporary } of staged) await rm(temporary, { force: true })
  }
}

const silentProgress = { line: () => undefined, event: () => undefined, done: () => undefined }

function createProgress(io: CliIo, started: number) {
  let open = false
  const elapsed = () => `${((performance.now() - started) / 1000).toFixed(1)} s`
  const show = (text: string) => {
    if (io.isTty) {
      io.stderr(`\r\x1b[2K${text}`)
      open = true
    } else io.stderr(`${text}\n`)
  }
  return {
    line(text: string) {
      if (open) io.stderr('\n')
      open = false
      io.stderr(`${text}\n`)
    },
    event(event: GateProgress) {
      if (event.stage === 'refit') show(`[${elapsed()}] ${event.side}: refit ${event.refit + 1} of ${event.of}`)
      else if (event.stage === 'single-feature') show(`[${elapsed()}] ${event.side}: one-feature models for ${event.features} features`)
      else show(`[${elapsed()}] checks`)
    },
    done() {
      if (open) io.stderr('\n')
      open = false
    },
  }
}
