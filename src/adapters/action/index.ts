/**
 * The action's entry point (bundled to dist/index.js). One handler turns anything thrown, Error or
 * not, into a failed step, so that no failure can end as a success.
 *
 * @actions/github reads and parses the event file when it is first imported; it is imported only
 * once plumbline has read the event itself, so a malformed or binary event file is plumbline's
 * UserError (with the 'error' verdict output), not a throw at import time.
 */
import * as core from '@actions/core'
import { describeFailure } from '../../core/errors.ts'
import { runCheck } from '../check/run-check.ts'
import { runMerge, runPlan, runShard } from '../check/run-shards.ts'
import { fetchBase } from '../github/fetch-base.ts'
import type { GitHubClient, GitHubClientOptions } from '../github/github-client.ts'
import { redactSecrets, registerSecret } from '../security/secrets.ts'
import { cleanOutsideText } from '../security/terminal-text.ts'
import { run } from './main.ts'

let clientModule: typeof import('../github/github-client.ts') | null = null
const apiTimeout = Number(process.env.PLUMBLINE_API_TIMEOUT_SECONDS)

try {
  await run({
    core: {
      getInput: (name) => core.getInput(name),
      // Redacted here too, not only masked by the runner: a log line may echo an input that holds a secret.
      info: (message) => core.info(redactSecrets(cleanOutsideText(message))),
      warning: (message) => core.warning(redactSecrets(cleanOutsideText(message))),
      setSecret: (secret) => {
        core.setSecret(secret)
        registerSecret(secret)
      },
      setOutput: (name, value) => core.setOutput(name, redactSecrets(value)),
      setFailed: (message) => core.setFailed(redactSecrets(message)),
      group: (name, fn) => core.group(name, fn),
      appendSummary: async (markdown) => {
        await core.summary.addRaw(redactSecrets(markdown)).write()
      },
    },
    env: process.env,
    cwd: process.cwd(),
    createClient: (token: string, options: GitHubClientOptions): GitHubClient => {
      if (clientModule === null) throw new Error('the GitHub client was asked for before it was loaded')
      return clientModule.createGitHubClient(token, apiTimeout > 0 ? { ...options, requestTimeoutMilliseconds: apiTimeout * 1000 } : options)
    },
    loadClient: async () => {
      clientModule ??= await import('../github/github-client.ts')
    },
    runCheck,
    fetchBase,
    // Loaded when used: @actions/artifact reads the event file through @actions/github at import.
    uploadArtifact: async (name, file, rootDirectory) => {
      const { DefaultArtifactClient } = await import('@actions/artifact')
      return new DefaultArtifactClient().uploadArtifact(name, [file], rootDirectory, { retentionDays: 30 })
    },
    runPlan,
    runShard,
    runMerge,
    // Loaded when used, as the artifact client is: only a step with 'cache: true' needs it.
    loadCacheClient: async () => {
      const cache = await import('@actions/cache')
      return {
        isFeatureAvailable: () => cache.isFeatureAvailable(),
        restoreCache: (paths, key) => cache.restoreCache(paths, key),
        saveCache: (paths, key) => cache.saveCache(paths, key),
      }
    },
  })
} catch (error) {
  core.setFailed(redactSecrets(describeFailure(error)))
}
