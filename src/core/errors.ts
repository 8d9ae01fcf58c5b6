/** Something the user can fix: bad input, a missing file, a bad model. `fix` says how. */
export class UserError extends Error {
  constructor(
    message: string,
    readonly fix?: string,
  ) {
    super(message)
    this.name = 'UserError'
  }
}

/** A broken invariant: our bug, never the user's. */
export class InternalError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'InternalError'
  }
}

/** One text for anything thrown, so that no adapter can end a failure as a success. */
export function describeFailure(error: unknown): string {
  if (error instanceof UserError) return error.fix ? `${error.message}\n${error.fix}` : error.message
  const detail = error instanceof Error ? (error.stack ?? error.message) : String(error)
  return `Internal error (this is a bug, please report it):\n${detail}`
}
