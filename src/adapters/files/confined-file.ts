/**
 * Reading and writing the files a user names, confined to a folder: every path from the policy
 * (data.train, data.holdout, data.reference, model.onnx.path), the policy file itself and the
 * action's 'report' input is resolved against its side's checkout (or the workspace) and, after
 * following every symlink, must still lie inside it. Only regular files are read (a FIFO would block,
 * /dev/zero never ends, a directory is no file), and at most a stated number of bytes.
 *
 * Each refusal is a UserError naming the key or input as the user wrote it.
 */
import { constants } from 'node:fs'
import { open, realpath, stat } from 'node:fs/promises'
import { basename, dirname, isAbsolute, join, relative, resolve, sep } from 'node:path'
import { UserError } from '../../core/errors.ts'

/** Byte limits for what plumbline reads (documented in docs/policy.md). */
export const readLimits = {
  /** A CSV file: its text must fit one JavaScript string with room to spare. */
  data: 256 * 1024 * 1024,
  /** An ONNX model. */
  model: 512 * 1024 * 1024,
  /** plumbline.yml. */
  policy: 1024 * 1024,
  /** A published JSON report. */
  report: 64 * 1024 * 1024,
  /** The event payload the runner writes. */
  event: 32 * 1024 * 1024,
} as const

export interface ConfinedPath {
  /** The key or input the path came from, for messages: "data.train", "input 'report'". */
  readonly key: string
  /** The path as the user wrote it. */
  readonly path: string
  /** The folder it must stay in (a checkout, the workspace). */
  readonly root: string
  /** How the root is called in messages: "the head checkout", "the workspace". */
  readonly rootName: string
}

function mebibytes(bytes: number): string {
  return `${(bytes / (1024 * 1024)).toFixed(bytes % (1024 * 1024) === 0 ? 0 : 1)} MiB`
}

function isInside(root: string, path: string): boolean {
  const rel = relative(root, path)
  return rel === '' || (!rel.startsWith(`..${sep}`) && rel !== '..' && !isAbsolute(rel))
}

function outside(target: ConfinedPath, how: string): UserError {
  return new UserError(
    `${target.key} '${target.path}' ${how} outside ${target.rootName}; plumbline reads and writes only inside it.`,
    `Give a path relative to ${target.rootName}, without '..' climbing out of it and without a symlink that points outside.`,
  )
}

/** The real path of `target` inside its root; a UserError when it lies (or a symlink points) outside, or does not exist. */
export async function resolveConfined(target: ConfinedPath, missing: () => UserError): Promise<string> {
  const root = await realpath(target.root)
  const lexical = resolve(root, target.path)
  if (!isInside(root, lexical)) throw outside(target, 'lies')
  let real: string
  try {
    real = await realpath(lexical)
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code
    if (code === 'ENOENT' || code === 'ENOTDIR') {
      // A dangling symlink or a missing file: name where it would have pointed only if inside.
      await refuseEscapingParent(target, root, lexical)
      throw missing()
    }
    if (code === 'ELOOP') throw new UserError(`${target.key} '${target.path}' is a symlink loop.`, 'Point the path at a regular file.')
    if (code === 'ENAMETOOLONG') throw new UserError(`${target.key} '${target.path.slice(0, 80)}…' is longer than the system allows for a path.`, 'Give a shorter path.')
    if (code === 'EACCES') throw new UserError(`${target.key} '${target.path}': permission denied.`, 'Make the file readable by the user that runs plumbline.')
    throw error
  }
  if (!isInside(root, real)) throw outside(target, 'points (through a symlink)')
  return real
}

/** The deepest existing ancestor of `lexical` must also resolve inside `root`. */
async function refuseEscapingParent(target: ConfinedPath, root: string, lexical: string): Promise<void> {
  let folder = dirname(lexical)
  while (isInside(root, folder) && folder !== root) {
    const real = await realpath(folder).catch(() => null)
    if (real !== null) {
      if (!isInside(root, real)) throw outside(target, 'points (through a symlinked folder)')
      return
    }
    folder = dirname(folder)
  }
}

/**
 * Reads a regular file inside its root, at most `maxBytes` (a longer file is refused, also when its
 * size is not known ahead, as in /proc). Opened without blocking, so a FIFO is refused, not waited on.
 */
export async function readConfinedFile(
  target: ConfinedPath,
  options: { readonly maxBytes: number; readonly what: string; readonly missing: () => UserError; readonly limitFix?: string },
): Promise<Buffer> {
  const real = await resolveConfined(target, options.missing)
  return readRegularFile(real, { ...options, name: `${target.key} '${target.path}'` })
}

/**
 * Reads a regular file (not confined: for paths plumbline chose itself, such as $PLUMBLINE_OUTPUT or
 * the runner's event file), refusing symlinks when `noFollow`, anything but a regular file, and more
 * than `maxBytes`.
 */
export async function readRegularFile(
  path: string,
  options: { readonly maxBytes: number; readonly what: string; readonly name: string; readonly missing: () => UserError; readonly noFollow?: boolean; readonly limitFix?: string },
): Promise<Buffer> {
  let handle
  try {
    handle = await open(path, constants.O_RDONLY | constants.O_NONBLOCK | (options.noFollow ? constants.O_NOFOLLOW : 0))
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code
    if (code === 'ENOENT' || code === 'ENOTDIR') throw options.missing()
    if (code === 'ELOOP') throw new UserError(`${options.name} is a symlink; plumbline reads only a regular file there.`, `Write the ${options.what} itself at that path, not a link to it.`)
    if (code === 'EACCES') throw new UserError(`${options.name}: permission denied.`, 'Make the file readable by the user that runs plumbline.')
    if (code === 'EISDIR') throw notRegular(options.name, options.what, 'a directory')
    throw error
  }
  try {
    const info = await handle.stat()
    if (!info.isFile()) {
      const kind = info.isDirectory() ? 'a directory' : info.isFIFO() ? 'a FIFO (named pipe)' : info.isCharacterDevice() || info.isBlockDevice() ? 'a device' : info.isSocket() ? 'a socket' : 'not a regular file'
      throw notRegular(options.name, options.what, kind)
    }
    const tooLarge = () =>
      new UserError(
        `${options.name} is larger than plumbline reads for a ${options.what} (${mebibytes(options.maxBytes)}).`,
        options.limitFix ?? `Use a smaller ${options.what}: sample the rows, or check that the path names the right file.`,
      )
    if (info.size > options.maxBytes) throw tooLarge()
    // Read in chunks up to the limit: the size stat reports can be 0 or wrong (procfs, a growing file).
    const chunks: Buffer[] = []
    let total = 0
    for (;;) {
      const chunk = Buffer.allocUnsafe(Math.min(1024 * 1024, options.maxBytes + 1 - total))
      const { bytesRead } = await handle.read(chunk, 0, chunk.length, null)
      if (bytesRead === 0) break
      total += bytesRead
      if (total > options.maxBytes) throw tooLarge()
      chunks.push(chunk.subarray(0, bytesRead))
    }
    return Buffer.concat(chunks, total)
  } finally {
    await handle.close()
  }
}

function notRegular(name: string, what: string, kind: string): UserError {
  return new UserError(`${name} is ${kind}, not a regular file; plumbline reads a ${what} only from a regular file.`, `Point it at the ${what} file itself.`)
}

/**
 * Where to write a file the user named (the check-mode 'report' input, --json, --markdown): inside
 * `root` after following symlinks of the folders on the way, and not an existing directory or
 * non-regular file. The folder is created when missing. Returns the path to write.
 */
export async function resolveConfinedOutput(target: ConfinedPath, options: { readonly confine: boolean }): Promise<string> {
  const root = await realpath(target.root)
  const lexical = resolve(root, target.path)
  if (options.confine && !isInside(root, lexical)) throw outside(target, 'lies')
  let folder = dirname(lexical)
  while (!(await stat(folder).then(() => true, () => false)) && dirname(folder) !== folder) folder = dirname(folder)
  const realFolder = await realpath(folder)
  if (options.confine && !isInside(root, realFolder)) throw outside(target, 'points (through a symlinked folder)')
  const full = join(realFolder, relative(folder, dirname(lexical)), basename(lexical))
  const existing = await stat(full).catch(() => null)
  if (existing?.isDirectory()) {
    throw new UserError(`${target.key} '${target.path}' is a directory; plumbline writes a report file there.`, 'Name a file, for example report.json inside that folder.')
  }
  if (existing && !existing.isFile() && !existing.isCharacterDevice()) {
    throw new UserError(`${target.key} '${target.path}' is not a regular file.`, 'Name a new or regular file to write the report to.')
  }
  if (options.confine) {
    const realFull = await realpath(full).catch(() => null)
    if (realFull !== null && !isInside(root, realFull)) throw outside(target, 'points (through a symlink)')
  }
  return full
}
