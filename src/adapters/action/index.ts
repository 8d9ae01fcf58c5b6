/**
 * The action's entry point (bundled to dist/index.js). One handler turns anything thrown, Error or
 * not, into a failed step, so that no failure can end as a success.
 */
import { DefaultArtifactClient } from '@actions/artifact'
import * as core from '@actions/core'
import { describeFailure } from '../../core/errors.ts'
import { runCheck } from '../check/run-check.ts'
import { fetchBase } from '../github/fetch-base.ts'
import { createGitHubClient } from '../github/github-client.ts'
import { run } from './main.ts'

try {
  await run({
    core: {
      getInput: (name) => core.getInput(name),
      info: (message) => core.info(message),
      warning: (message) => core.warning(message),
      setSecret: (secret) => core.setSecret(secret),
      setOutput: (name, value) => core.setOutput(name, value),
      setFailed: (message) => core.setFailed(message),
      group: (name, fn) => core.group(name, fn),
      appendSummary: async (markdown) => {
        await core.summary.addRaw(markdown).write()
      },
    },
    env: process.env,
    cwd: process.cwd(),
    createClient: createGitHubClient,
    runCheck,
    fetchBase,
    uploadArtifact: (name, file, rootDirectory) => new DefaultArtifactClient().uploadArtifact(name, [file], rootDirectory, { retentionDays: 30 }),
  })
} catch (error) {
  core.setFailed(describeFailure(error))
}
