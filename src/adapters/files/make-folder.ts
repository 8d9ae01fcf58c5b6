/**
 * Creating the folder an output goes to, one level at a time. Node's `mkdir(path, { recursive: true })`
 * never returns for a path under /proc (the kernel answers ENOENT for a folder whose parent exists,
 * and the recursive walk retries it for ever: seen with Node 20.20 and 24), so a user's
 * `--json /proc/x/report.json` hung the CLI. Here the nearest existing ancestor is found first and
 * each missing level is made with a plain mkdir, so every failure comes back as an error.
 */
import { mkdir, stat } from 'node:fs/promises'
import { dirname } from 'node:path'

/** Plain words for the errno codes a folder or file write meets, for messages. */
export function describeWriteError(error: unknown): string {
  const code = (error as NodeJS.ErrnoException).code
  const words: Record<string, string> = {
    ENOENT: 'the folder cannot be created there',
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    ENOTDIR: 'a part of the path is a file, not a folder',
    EEXIST: 'a part of the path is a file, not a folder',
    EROFS: 'the file system is read-only',
    ENOSPC: 'no space is left on the disk',
    EISDIR: 'it is a folder',
  }
  return code && words[code] ? `${words[code]} (${code})` : (code ?? (error as Error).message)
}

/** Makes `folder` and its missing parents; throws the first error of a level that cannot be made. */
export async function makeFolder(folder: string): Promise<void> {
  const missing: string[] = []
  let current = folder
  for (;;) {
    const found = await stat(current).catch(() => null)
    if (found) {
      if (!found.isDirectory()) throw Object.assign(new Error(`${current} is not a folder`), { code: 'ENOTDIR' })
      break
    }
    const parent = dirname(current)
    if (parent === current) break
    missing.push(current)
    current = parent
  }
  for (const level of missing.reverse()) {
    await mkdir(level).catch(async (error: NodeJS.ErrnoException) => {
      // Another process made it meanwhile: fine when it is a folder.
      if (error.code === 'EEXIST' && (await stat(level).catch(() => null))?.isDirectory()) return
      throw error
    })
  }
}
