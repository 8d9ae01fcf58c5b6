import { UserError } from '../../../src/core/errors.ts'

/** The UserError that `run` throws, as "message | fix", so a test can assert both word for word. */
export function userErrorText(run: () => unknown): string {
  try {
    run()
  } catch (error) {
    if (error instanceof UserError) return `${error.message} | ${error.fix}`
    throw error
  }
  throw new Error('expected a UserError, but nothing was thrown')
}
