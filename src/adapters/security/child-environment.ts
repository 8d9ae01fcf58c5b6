/**
 * The environment every command plumbline starts is given (prepare, the training command, git): an
 * allowlist, never the whole environment. A pull request controls `prepare` and the training
 * command, so they must not see the action's inputs (INPUT_TOKEN), the runner's service tokens
 * (ACTIONS_*), GITHUB_TOKEN or anything else that looks like a credential. Variables are kept when
 * their name is on the list below (or starts with PLUMBLINE_, or LC_), and the name does not look
 * secret (TOKEN, SECRET, PASSWORD, KEY, CREDENTIAL, AUTH, COOKIE, SESSION anywhere in it).
 */

/** Names a command may need to find programs, write temporary files and read text as UTF-8. */
const commonNames = ['PATH', 'HOME', 'USER', 'LOGNAME', 'SHELL', 'LANG', 'LANGUAGE', 'TZ', 'TMPDIR', 'TMP', 'TEMP', 'TERM', 'PWD', 'CI'] as const

/** What training tools read to find their libraries and size their thread pools (no credentials). */
const toolNames = ['PYTHONPATH', 'PYTHONHOME', 'VIRTUAL_ENV', 'CONDA_PREFIX', 'CONDA_DEFAULT_ENV', 'LD_LIBRARY_PATH', 'JAVA_HOME', 'OMP_NUM_THREADS', 'MKL_NUM_THREADS', 'OPENBLAS_NUM_THREADS'] as const

/** Extra names git needs to fetch through a proxy or ssh (git is ours, not the pull request's code). */
const gitNames = ['SSH_AUTH_SOCK', 'GIT_SSH', 'GIT_SSH_COMMAND', 'HTTP_PROXY', 'HTTPS_PROXY', 'NO_PROXY', 'http_proxy', 'https_proxy', 'no_proxy', 'GIT_CONFIG_NOSYSTEM', 'GIT_CONFIG_GLOBAL', 'GIT_CONFIG_SYSTEM', 'XDG_CONFIG_HOME'] as const

/** A name that looks like it holds a credential; such a variable is never passed on, whatever its prefix. */
export const secretLookingName = /TOKEN|SECRET|PASSW|(^|_)KEY($|_)|API_?KEY|PRIVATE|CREDENTIAL|AUTH|COOKIE|SESSION/i

export type ChildPurpose = 'command' | 'git'

/**
 * The allowlisted subset of `source` (default process.env), plus `extra` (which wins; its
 * secret-looking names are dropped too). `purpose: 'git'` also keeps the proxy and ssh variables.
 */
export function childEnvironment(
  extra: Readonly<Record<string, string>> = {},
  options: { readonly purpose?: ChildPurpose; readonly source?: Readonly<Record<string, string | undefined>> } = {},
): Record<string, string> {
  const source = options.source ?? process.env
  const allowed = new Set<string>([...commonNames, ...(options.purpose === 'git' ? gitNames : toolNames)])
  const kept: Record<string, string> = {}
  for (const [name, value] of Object.entries(source)) {
    if (value === undefined) continue
    const isListed = allowed.has(name) || name.startsWith('PLUMBLINE_') || name.startsWith('LC_')
    // SSH_AUTH_SOCK is a socket path, not a secret, though its name says AUTH.
    if (isListed && (name === 'SSH_AUTH_SOCK' || !secretLookingName.test(name))) kept[name] = value
  }
  for (const [name, value] of Object.entries(extra)) {
    if (!secretLookingName.test(name)) kept[name] = value
  }
  return kept
}
