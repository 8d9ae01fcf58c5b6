import { UserError } from '../../src/core/errors.ts'

/** The UserError a promise rejects with, as "message | fix", so a test can assert both word for word. */
export async function userErrorOf(promise: Promise<unknown>): Promise<string> {
  const error = await promise.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(error instanceof UserError)) throw new Error(`expected a UserError, got ${String(error)}`)
  return `${error.message} | ${error.fix}`
}
