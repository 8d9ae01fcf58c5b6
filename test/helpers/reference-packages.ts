/**
 * The Debian packages some tests take reference values from (seen by /usr/bin/python3, not the
 * `python3` on PATH), and one way to skip when one is missing: `missingReference(need, file)` returns
 * undefined when the package is there, else the reason, after printing one line naming the package
 * (`.ci/run` installs them all; `apt-get install <package>` on a fresh machine).
 */
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'

export type ReferencePackage = 'python3-sklearn' | 'python3-onnx' | 'python3-scipy' | 'python3-xgboost' | 'cmark-gfm'

/** The breast-cancer table that python3-sklearn ships. */
export const breastCancerCsv = '/usr/lib/python3/dist-packages/sklearn/datasets/data/breast_cancer.csv'

const probes: Record<ReferencePackage, () => boolean> = {
  'python3-sklearn': () => existsSync(breastCancerCsv) && imports('sklearn'),
  'python3-onnx': () => imports('onnx'),
  'python3-scipy': () => imports('scipy'),
  'python3-xgboost': () => imports('xgboost'),
  'cmark-gfm': () => runs('cmark-gfm', ['--version']),
}

const known = new Map<ReferencePackage, boolean>()

function imports(module: string): boolean {
  return runs('/usr/bin/python3', ['-c', `import ${module}`])
}

function runs(command: string, args: string[]): boolean {
  try {
    execFileSync(command, args, { stdio: 'pipe', timeout: 60_000 })
    return true
  } catch {
    return false
  }
}

export function missingReference(need: ReferencePackage, file: string, what = 'the reference checks'): string | undefined {
  if (!known.has(need)) known.set(need, probes[need]())
  if (known.get(need)) return undefined
  const reason = `Debian's ${need} is not installed (apt-get install ${need}; .ci/run installs it)`
  process.stderr.write(`${file}: skipped ${what}, because ${reason}\n`)
  return reason
}
