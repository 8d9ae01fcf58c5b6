import { writeFile } from 'node:fs/promises'
import { resolve } from 'node:path'
import { UserError } from '../../core/errors.ts'
import { runPlan, runShard } from '../check/run-shards.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'
import type { Command } from './args.ts'
import type { CliIo } from './cli-io.ts'

/**
 * `plumbline plan` prints the matrix (one line of JSON on stdout, for a step output) and each
 * shard's units on stderr; `plumbline shard` prints where its partial file went. Both exit 0.
 */
export async function runShardCommand(command: Extract<Command, { name: 'plan' | 'shard' }>, io: CliIo): Promise<number> {
  const log = (line: string) => io.stderr(`${cleanOutsideText(line)}\n`)
  const sides = { cwd: io.cwd, policyPath: command.policy, baseRef: command.base, headRef: command.head, log }
  if (command.name === 'plan') {
    const plan = await runPlan({ ...sides, shards: command.shards })
    if (command.out) {
      const path = resolve(io.cwd, command.out)
      await writeFile(path, `${JSON.stringify(plan.file, null, 2)}\n`).catch((error: NodeJS.ErrnoException) => {
        throw new UserError(`Could not write --out ${path}: ${error.code ?? error.message}.`, 'Name a file in a folder you can write to (--out FILE).')
      })
    }
    for (const line of plan.summary) log(line)
    io.stdout(`${JSON.stringify(plan.matrix)}\n`)
    return 0
  }
  const result = await runShard({ ...sides, index: command.index, of: command.of, out: command.out, after: command.after, cache: command.cache })
  log(
    `shard ${command.index} of ${command.of} (${result.stage}): ${result.units.length} unit${result.units.length === 1 ? '' : 's'}` +
      `${command.cache ? `, ${result.reused.length} from the cache` : ''}; wrote ${result.path}`,
  )
  return 0
}
