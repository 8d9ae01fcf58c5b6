import { mkdir, writeFile } from 'node:fs/promises'
import { dirname, resolve } from 'node:path'
import { describeFailure, UserError } from '../../core/errors.ts'
import { errorReport } from '../../core/report/error-report.ts'
import { renderHtml } from '../../core/report/render-html.ts'
import { renderMarkdown } from '../../core/report/render-markdown.ts'
import { renderText } from '../../core/report/render-text.ts'
import type { GateReport } from '../../core/report/report.ts'
import type { GateProgress } from '../../core/run-gate.ts'
import { runCheck } from '../check/run-check.ts'
import { toolVersion } from '../version.ts'
import { parseCommand } from './args.ts'
import type { CliIo } from './cli-io.ts'
import { init } from './init.ts'

export type { CliIo }

/** Runs one CLI invocation and returns the exit code: 0 pass/warn, 1 block, 2 user error, 3 internal. */
export async function main(argv: readonly string[], io: CliIo): Promise<number> {
  let command
  try {
    command = parseCommand(argv)
  } catch (error) {
    io.stderr(`${describeFailure(error)}\n`)
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
    const started = performance.now()
    // --quiet: the verdict line and nothing else (errors still reach stderr).
    const progress = command.quiet ? silentProgress : createProgress(io, started)
    let report: GateReport
    try {
      report = await runCheck({
        cwd: io.cwd,
        policyPath: command.policy,
        baseRef: command.base,
        headRef: command.head,
        log: (line) => progress.line(line),
        onProgress: (event) => progress.event(event),
      })
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
    await writeOutputs(command, report, io.cwd)
    if (command.quiet) {
      io.stdout(`plumbline: ${report.headline}\n`)
    } else {
      io.stdout(`${renderText(report)}\n`)
      io.stderr(`plumbline: ${report.verdict} in ${((performance.now() - started) / 1000).toFixed(1)} s\n`)
    }
    return report.verdict === 'block' ? 1 : 0
  } catch (error) {
    io.stderr(`${describeFailure(error)}\n`)
    return error instanceof UserError ? 2 : 3
  }
}

async function writeOutputs(command: { json?: string; markdown?: string; html?: string }, report: GateReport, cwd: string) {
  const write = async (path: string, text: string) => {
    const full = resolve(cwd, path)
    await mkdir(dirname(full), { recursive: true })
    await writeFile(full, text)
  }
  if (command.json) await write(command.json, `${JSON.stringify(report, null, 2)}\n`)
  if (command.markdown) await write(command.markdown, renderMarkdown(report))
  if (command.html) await write(command.html, renderHtml(report))
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
