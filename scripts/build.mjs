// npm run build (after tsc --noEmit): bundles the action (src/adapters/action/index.ts ->
// dist/index.js) and the CLI (src/adapters/cli/index.ts -> dist/cli/index.js), each with the
// refit pool's worker (refit-worker.js, and tinypool's entry/worker.js, beside it), with esbuild, as ESM
// for Node 20 and later, with every dependency inside, so that `node dist/index.js` runs from a bare
// copy of dist/ with no node_modules.
//
// onnxruntime-node loads its native binding with a computed require
// (`../bin/napi-v6/${process.platform}/${process.arch}/onnxruntime_binding.node`). The build replaces
// that one expression: the binding and the shared library it links against (RUNPATH $ORIGIN) are
// copied to dist/native/, which carries linux-x64 only (GitHub's ubuntu runners; the library alone is
// 44 MB a platform). Elsewhere the binding is replaced by one that registers no backend and names
// the platform when an ONNX model is opened, so the built-in learners still work there.
//
// The output is deterministic (CI rebuilds and fails on any difference): no timestamps, no absolute
// paths (esbuild names modules relative to absWorkingDir), files copied byte for byte.
import { build } from 'esbuild'
import { copyFile, mkdir, readFile, rm } from 'node:fs/promises'
import { dirname, join, relative } from 'node:path'
import { fileURLToPath } from 'node:url'

const root = join(dirname(fileURLToPath(import.meta.url)), '..')
const dist = join(root, 'dist')
const nativeSource = join(root, 'node_modules', 'onnxruntime-node', 'bin', 'napi-v6', 'linux', 'x64')
const nativeFiles = ['onnxruntime_binding.node', 'libonnxruntime.so.1']
const bindingExpression = 'require(`../bin/napi-v6/${process.platform}/${process.arch}/onnxruntime_binding.node`)'

// ESM output cannot call require; CommonJS dependencies do, so give them one that resolves from the bundle.
const banner = [
  "import { createRequire as __plumblineCreateRequire } from 'node:module';",
  'const require = __plumblineCreateRequire(import.meta.url);',
].join('\n')

/** Points onnxruntime-node's binding require at dist/native/, relative to the bundle at `outfile`. */
function onnxBindingPlugin(outfile) {
  const fromBundle = relative(dirname(outfile), join(dist, 'native', 'onnxruntime_binding.node')).split('\\').join('/')
  const nativePath = fromBundle.startsWith('../') ? fromBundle : `./${fromBundle}`
  return {
    name: 'onnxruntime-binding',
    setup(context) {
      // The copied binding is loaded at run time from beside the bundle, never bundled.
      context.onResolve({ filter: /onnxruntime_binding\.node$/ }, (args) => ({ path: args.path, external: true }))
      context.onLoad({ filter: /onnxruntime-node[\\/]dist[\\/]binding\.js$/ }, async (args) => {
        const source = await readFile(args.path, 'utf8')
        if (!source.includes(bindingExpression)) {
          throw new Error(`${args.path} no longer loads its binding with ${bindingExpression}; update scripts/build.mjs`)
        }
        const loader = `(function loadOnnxruntimeBinding() {
  if (process.platform === 'linux' && process.arch === 'x64') return require(${JSON.stringify(nativePath)});
  function InferenceSession() {
    throw new Error('ONNX models need onnxruntime, which the plumbline bundle carries for linux-x64 only; this is ' +
      process.platform + '-' + process.arch + '. Run the job on a Linux x64 runner (ubuntu-latest), or use a built-in learner.');
  }
  return { listSupportedBackends: () => [{ name: 'cpu', bundled: true }], initOrtOnce: () => undefined, InferenceSession };
})()`
        return { contents: source.replace(bindingExpression, loader), loader: 'js' }
      })
    },
  }
}

async function bundle(entry, outfile) {
  await build({
    absWorkingDir: root,
    entryPoints: [entry],
    outfile,
    bundle: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    banner: { js: banner },
    legalComments: 'eof',
    charset: 'utf8',
    logLevel: 'warning',
    logOverride: { 'require-resolve-not-external': 'silent' },
    plugins: [onnxBindingPlugin(outfile)],
  })
}

await rm(dist, { recursive: true, force: true })
// Each entry point looks for the refit pool's worker script beside itself (src/adapters/parallel/create-pool-measure.ts).
for (const folder of [dist, join(dist, 'cli')]) await bundle('src/adapters/parallel/refit-worker.ts', join(folder, 'refit-worker.js'))
// tinypool starts its threads from `${its module URL}/../entry/worker.js`; inside a bundle that URL is
// the bundle's own, so its thread entry goes to entry/worker.js beside each bundle.
for (const folder of [dist, join(dist, 'cli')]) await bundle('node_modules/tinypool/dist/entry/worker.js', join(folder, 'entry', 'worker.js'))
await bundle('src/adapters/action/index.ts', join(dist, 'index.js'))
await bundle('src/adapters/cli/index.ts', join(dist, 'cli', 'index.js'))
await mkdir(join(dist, 'native'), { recursive: true })
for (const file of nativeFiles) await copyFile(join(nativeSource, file), join(dist, 'native', file))
