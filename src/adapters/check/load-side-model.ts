import { readdir } from 'node:fs/promises'
import { basename, dirname, join, resolve } from 'node:path'
import type { GateConfig } from '../../core/config.ts'
import type { Dataset } from '../../core/data/dataset.ts'
import { UserError } from '../../core/errors.ts'
import type { SideModel } from '../../core/gate/gate-inputs.ts'
import { readConfinedFile, readLimits, resolveConfined } from '../files/confined-file.ts'
import { loadOnnxModel } from '../onnx/load-onnx-model.ts'
import { createCommandFit } from '../training/create-command-fit.ts'

/**
 * A side's model when the policy does not use a built-in learner: an ONNX file read from the
 * side's checkout (model.onnx), or the repository's own training command run once per refit
 * (model.train).
 */
export async function loadSideModel(
  config: GateConfig,
  side: { checkout: string; side: 'base' | 'head'; train: Dataset; holdout: Dataset; log: (line: string) => void },
): Promise<SideModel> {
  const model = config.model
  if (model.kind === 'onnx') {
    const path = await resolveModelPath(side.checkout, model.path, side.side)
    const bytes = await readConfinedFile(
      { key: 'model.onnx.path', path: path, root: side.checkout, rootName: `the ${side.side} checkout` },
      {
        maxBytes: readLimits.model,
        what: 'ONNX model',
        missing: () =>
          new UserError(
            `No ONNX model at ${model.path} on the ${side.side} side (looked for ${resolve(side.checkout, path)}).`,
            "Commit the model file on both sides, build it in 'prepare', or fix 'model.onnx.path' in the policy.",
          ),
        limitFix: 'Export a smaller model (fewer or shallower trees), or check that model.onnx.path names the model file.',
      },
    )
    side.log(`${side.side}: loaded ONNX model ${model.path} (${(bytes.length / 1024).toFixed(0)} KiB)`)
    return {
      kind: 'loaded',
      model: await loadOnnxModel(new Uint8Array(bytes), {
        source: `${side.side}:${model.path}`,
        task: config.task,
        features: side.train.features,
        featureOrder: model.features,
        positiveClass: model.positiveClass,
        ...(config.task === 'multiclass' ? { classes: side.train.target?.classes ?? [] } : {}),
      }),
    }
  }
  if (model.kind === 'train') {
    if (config.data.holdout.kind !== 'file') {
      throw new UserError(
        'model.train needs data.holdout to name a file: the training command is given file paths, and a split holdout has no file of its own.',
        "Write the holdout rows to their own file in 'prepare' and set 'data.holdout' to it, or use 'model.builtin'.",
      )
    }
    return {
      kind: 'command',
      fit: createCommandFit({
        command: model.command,
        timeoutSeconds: model.timeoutSeconds,
        parallel: model.parallel,
        sides: {
          [side.side]: {
            cwd: side.checkout,
            train: resolve(side.checkout, config.data.train),
            holdout: resolve(side.checkout, config.data.holdout.path),
          },
        },
        task: config.task,
        features: side.train.features,
        ...(config.task === 'multiclass' ? { classes: side.train.target?.classes ?? [] } : {}),
        onTrained: (event) => side.log(`${event.label}: trained in ${event.seconds.toFixed(1)} s`),
      }),
    }
  }
  throw new Error(`loadSideModel: a built-in model needs no loading (model kind ${model.kind})`)
}

/** A path, or a glob whose last segment has `*`: exactly one file must match. Returns the path relative to the checkout, as written. */
async function resolveModelPath(checkout: string, pattern: string, sideName: string): Promise<string> {
  if (!pattern.includes('*')) return pattern
  const glob = basename(pattern)
  if (dirname(pattern).includes('*')) {
    throw new UserError(`model.onnx.path '${pattern}': '*' is allowed in the file name only.`, "Name the folder exactly, e.g. 'models/*.onnx'.")
  }
  // The folder is confined like the file: a symlinked folder pointing outside is refused here.
  const dir = await resolveConfined(
    { key: 'model.onnx.path', path: dirname(pattern), root: checkout, rootName: `the ${sideName} checkout` },
    () => new UserError(`model.onnx.path '${pattern}': there is no folder ${dirname(pattern)} on the ${sideName} side.`, "Fix 'model.onnx.path' in the policy, or create the folder in 'prepare'."),
  )
  const matcher = new RegExp(`^${glob.split('*').map((p) => p.replace(/[.+?^${}()|[\]\\]/g, '\\$&')).join('.*')}$`)
  const names = (await readdir(dir).catch(() => [] as string[])).filter((n) => matcher.test(n)).sort()
  if (names.length !== 1) {
    throw new UserError(
      `model.onnx.path '${pattern}' matches ${names.length} files on the ${sideName} side${names.length ? ` (${names.join(', ')})` : ''}; it must match exactly one.`,
      'Make the pattern match one model file, or name the file exactly.',
    )
  }
  return join(dirname(pattern), names[0])
}
