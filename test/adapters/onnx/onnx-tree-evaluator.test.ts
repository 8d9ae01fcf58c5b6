import { readFileSync } from 'node:fs'
import ort from 'onnxruntime-node'
import { describe, expect, it } from 'vitest'
import { selectRows, type Dataset, type FeatureInfo, type FeatureMatrix } from '../../../src/core/data/dataset.ts'
import { loadOnnxModel } from '../../../src/adapters/onnx/load-onnx-model.ts'
import { exportOnnx } from '../../../src/core/models/export-onnx.ts'
import { binFeatures } from '../../../src/core/models/gbt/bin-features.ts'
import { fitBoosted } from '../../../src/core/models/gbt/fit-boosted.ts'
import { encodeOnnxModel, FEATURES_METADATA_KEY, OnnxAttributeType, OnnxDataType, type OnnxAttribute } from '../../../src/core/models/onnx-proto.ts'
import { parsePolicy } from '../../../src/core/policy/parse-policy.ts'
import { runGate, type SideInputs } from '../../../src/core/run-gate.ts'
import { createRandom, type Random } from '../../../src/core/statistics/random.ts'

// The reference outside the project: onnxruntime 1.30 (onnxruntime-node) running the same bytes.
// plumbline's tree evaluator (loadOnnxModel's engine 'plumbline-trees') must predict what
// onnxruntime predicts on random rows, rows set exactly on thresholds, and missing values, to the
// float32 rounding of onnxruntime's tree outputs.

const F = 4
const features: FeatureInfo[] = Array.from({ length: F }, (_, j) => ({ name: `x${j}`, kind: 'numeric' as const }))

function rows(random: Random, n: number, thresholds: readonly number[][]): FeatureMatrix {
  const columns = Array.from({ length: F }, (_, j) =>
    Float64Array.from({ length: n }, (_, i) => {
      if (random.next() < 0.1) return NaN
      // A third of the values sit exactly on some threshold of the feature, to test the equality case.
      if (i % 3 === 0 && thresholds[j].length > 0) return thresholds[j][random.int(thresholds[j].length)]
      return 4 * random.normal()
    }),
  )
  return { rows: n, features, columns }
}

async function onnxruntimePredict(bytes: Uint8Array, output: string, x: FeatureMatrix, type: 'float32' | 'float64', column: number) {
  const session = await ort.InferenceSession.create(bytes)
  const data = type === 'float32' ? new Float32Array(x.rows * F) : new Float64Array(x.rows * F)
  for (let i = 0; i < x.rows; i++) for (let j = 0; j < F; j++) data[i * F + j] = x.columns[j][i]
  const result = await session.run({ X: new ort.Tensor(type, data, [x.rows, F]) }, [output])
  const values = result[output].data as Float32Array
  const width = result[output].dims[1] ?? 1
  return Float64Array.from({ length: x.rows }, (_, i) => values[i * width + column])
}

async function expectAgreement(
  bytes: Uint8Array, task: 'binary' | 'regression', output: string, type: 'float32' | 'float64', thresholds: number[][], seed: number,
  engine: 'plumbline-trees' | 'onnxruntime' = 'plumbline-trees',
) {
  const model = await loadOnnxModel(bytes, { source: 'trees.onnx', task, features, featureOrder: features.map((f) => f.name) })
  const x = rows(createRandom(seed), 3000, thresholds)
  const ours = await model.predict(x)
  expect(model.engine).toBe(engine)
  if (engine === 'onnxruntime') return
  expect(model.createReplacementPredictor?.(x)).toBeDefined()
  const reference = await onnxruntimePredict(bytes, output, x, type, task === 'binary' ? 1 : 0)
  for (let i = 0; i < x.rows; i++) expect(Math.abs(ours[i] - reference[i])).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(reference[i])))
}

const ints = (name: string, values: number[]): OnnxAttribute => ({ name, type: OnnxAttributeType.INTS, ints: values })
const floats = (name: string, values: number[]): OnnxAttribute => ({ name, type: OnnxAttributeType.FLOATS, floats: values })
const text = (name: string, value: string): OnnxAttribute => ({ name, type: OnnxAttributeType.STRING, s: new TextEncoder().encode(value) })
const texts = (name: string, values: string[]): OnnxAttribute => ({ name, type: OnnxAttributeType.STRINGS, strings: values.map((v) => new TextEncoder().encode(v)) })

/**
 * Random trees in ONNX attribute form: every branch mode but EQ/NEQ, random missing directions,
 * node ids shuffled within each tree (not root-first), float32 thresholds. Leaves carry one
 * weight per class id in `classes`; with `asFractions`, each leaf's weights are scaled to sum to
 * 1 / count (a forest's class fractions averaged over its trees).
 */
function randomTrees(random: Random, count: number, classes: number, leafWeight: () => number, asFractions = false) {
  const a = { treeIds: [] as number[], nodeIds: [] as number[], featureIds: [] as number[], modes: [] as string[], values: [] as number[], trueIds: [] as number[], falseIds: [] as number[], tracks: [] as number[] }
  const leaves = { treeIds: [] as number[], nodeIds: [] as number[], ids: [] as number[], weights: [] as number[] }
  const thresholds: number[][] = Array.from({ length: F }, () => [])
  const modes = ['BRANCH_LEQ', 'BRANCH_LT', 'BRANCH_GTE', 'BRANCH_GT']
  for (let t = 0; t < count; t++) {
    const size = 2 ** (1 + random.int(4)) - 1 // a full tree of 1..4 levels of branches
    const ids = Array.from({ length: size }, (_, k) => k * 7 + 3)
    for (let k = ids.length - 1; k > 0; k--) {
      const j = random.int(k + 1)
      ;[ids[k], ids[j]] = [ids[j], ids[k]]
    }
    for (let k = 0; k < size; k++) {
      a.treeIds.push(t)
      a.nodeIds.push(ids[k])
      const isLeaf = 2 * k + 1 >= size
      if (isLeaf) {
        a.featureIds.push(0)
        a.modes.push('LEAF')
        a.values.push(0)
        a.trueIds.push(0)
        a.falseIds.push(0)
        a.tracks.push(0)
        const weights = Array.from({ length: classes }, leafWeight)
        const total = weights.reduce((sum, w) => sum + w, 0)
        for (let c = 0; c < classes; c++) {
          leaves.treeIds.push(t)
          leaves.nodeIds.push(ids[k])
          leaves.ids.push(c)
          leaves.weights.push(Math.fround(asFractions ? weights[c] / total / count : weights[c]))
        }
      } else {
        const f = random.int(F)
        const threshold = Math.fround(4 * random.normal())
        thresholds[f].push(threshold)
        a.featureIds.push(f)
        a.modes.push(modes[random.int(modes.length)])
        a.values.push(threshold)
        a.trueIds.push(ids[2 * k + 1])
        a.falseIds.push(ids[2 * k + 2])
        a.tracks.push(random.next() < 0.5 ? 1 : 0)
      }
    }
  }
  const attributes = (prefix: string): OnnxAttribute[] => [
    ints('nodes_treeids', a.treeIds), ints('nodes_nodeids', a.nodeIds), ints('nodes_featureids', a.featureIds), texts('nodes_modes', a.modes),
    floats('nodes_values', a.values), ints('nodes_truenodeids', a.trueIds), ints('nodes_falsenodeids', a.falseIds),
    ints('nodes_missing_value_tracks_true', a.tracks), ints(`${prefix}_treeids`, leaves.treeIds), ints(`${prefix}_nodeids`, leaves.nodeIds),
    ints(`${prefix}_ids`, leaves.ids), floats(`${prefix}_weights`, leaves.weights),
  ]
  return { attributes, thresholds }
}

function treeModel(node: { opType: string; attribute: OnnxAttribute[]; output: string[] }, elemType: number, outputs: { name: string; elemType: number; dims: (number | string)[] }[]) {
  return encodeOnnxModel({
    irVersion: 8,
    producerName: 'plumbline-test',
    opsetImport: [{ domain: '', version: 15 }, { domain: 'ai.onnx.ml', version: 3 }],
    metadataProps: [{ key: FEATURES_METADATA_KEY, value: JSON.stringify(features.map((f) => f.name)) }],
    graph: {
      name: 'trees',
      node: [{ ...node, input: ['X'], domain: 'ai.onnx.ml', name: 'trees' }],
      input: [{ name: 'X', type: { tensorType: { elemType, shape: { dim: [{ dimParam: 'N' }, { dimValue: F }] } } } }],
      output: outputs.map((o) => ({
        name: o.name,
        type: { tensorType: { elemType: o.elemType, shape: { dim: o.dims.map((d) => (typeof d === 'number' ? { dimValue: d } : { dimParam: d })) } } },
      })),
    },
  })
}

describe('loadOnnxModel on tree ensembles: plumbline evaluates them, as onnxruntime 1.30 does', () => {
  for (const [input, elemType] of [['float32', OnnxDataType.FLOAT], ['float64', OnnxDataType.DOUBLE]] as const) {
    for (const aggregate of ['SUM', 'AVERAGE']) {
      it(`TreeEnsembleRegressor, every branch mode, ${aggregate}, ${input} input`, async () => {
        const random = createRandom(elemType * 10 + aggregate.length)
        const { attributes, thresholds } = randomTrees(random, 25, 1, () => random.normal())
        const bytes = treeModel(
          { opType: 'TreeEnsembleRegressor', output: ['prediction'], attribute: [...attributes('target'), { name: 'n_targets', type: OnnxAttributeType.INT, i: 1 }, text('aggregate_function', aggregate), text('post_transform', 'NONE'), floats('base_values', [0.75])] },
          elemType,
          [{ name: 'prediction', elemType: OnnxDataType.FLOAT, dims: ['N', 1] }],
        )
        await expectAgreement(bytes, 'regression', 'prediction', input, thresholds, 7)
      })
    }
    for (const post of ['NONE', 'LOGISTIC', 'SOFTMAX']) {
      // SOFTMAX over two classes stays with onnxruntime (see parseOnnxTreeEnsemble).
      it(`TreeEnsembleClassifier, two classes, post_transform ${post}, ${input} input${post === 'SOFTMAX' ? ': left to onnxruntime' : ''}`, async () => {
        const random = createRandom(elemType * 100 + post.length)
        const count = 20
        // NONE sums the weights as probabilities, so they stay in [0, 1 / count] there.
        const { attributes, thresholds } = randomTrees(random, count, 2, post === 'NONE' ? () => random.next() / count : () => random.normal())
        const bytes = treeModel(
          { opType: 'TreeEnsembleClassifier', output: ['label', 'probabilities'], attribute: [...attributes('class'), ints('classlabels_int64s', [0, 1]), text('post_transform', post), ...(post === 'NONE' ? [] : [floats('base_values', [0.2, -0.1])])] },
          elemType,
          [{ name: 'label', elemType: OnnxDataType.INT64, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', 2] }],
        )
        await expectAgreement(bytes, 'binary', 'probabilities', input, thresholds, 8, post === 'SOFTMAX' ? 'onnxruntime' : 'plumbline-trees')
      })
    }
  }

  for (const task of ['regression', 'binary'] as const) {
    it(`a ${task} model from plumbline's own exporter (exportOnnx), with NaN and values on thresholds`, async () => {
      const random = createRandom(task === 'binary' ? 31 : 32)
      const x = rows(random, 1500, Array.from({ length: F }, () => []))
      const y = Float64Array.from({ length: x.rows }, (_, i) => {
        const s = (x.columns[0][i] || 0) - 0.5 * (x.columns[1][i] || 0) * (x.columns[2][i] || 0) + random.normal()
        return task === 'binary' ? (s > 0 ? 1 : 0) : s
      })
      const fitted = fitBoosted(binFeatures(x), y, { task, seed: 2, settings: { trees: 40, maxDepth: 5, learningRate: 0.2, minRowsPerLeaf: 5, l2: 1, rowSubsample: 0.8, columnSubsample: 0.8 } })
      const thresholds = Array.from({ length: F }, (_, j) => fitted.ensemble.trees.flatMap((t) => Array.from(t.feature).flatMap((f, node) => (f === j ? [t.threshold[node]] : []))))
      await expectAgreement(exportOnnx(fitted), task, task === 'binary' ? 'probabilities' : 'prediction', 'float64', thresholds, 33)
    })
  }

  it('keeps onnxruntime for a graph it cannot read (per-column inputs), and says so', async () => {
    const bytes = new Uint8Array(readFileSync(new URL('../../fixtures/onnx/per-column-regressor.onnx', import.meta.url)))
    const columns: FeatureInfo[] = [
      { name: 'distance_km', kind: 'numeric' },
      { name: 'weight_kg', kind: 'numeric' },
      { name: 'stop_count', kind: 'numeric' },
      { name: 'region', kind: 'categorical', categories: ['east', 'north', 'south'] },
    ]
    const model = await loadOnnxModel(bytes, { source: 'per-column.onnx', task: 'regression', features: columns })
    await model.predict({ rows: 1, features: columns, columns: [Float64Array.of(12), Float64Array.of(2), Float64Array.of(3), Float64Array.of(1)] })
    expect(model.engine).toBe('onnxruntime')
    expect(model.createReplacementPredictor?.({ rows: 0, features: columns, columns: columns.map(() => new Float64Array(0)) })).toBeUndefined()
  })
})

describe('loadOnnxModel on two-class TreeEnsembleClassifiers with LOGISTIC (and NONE): the rule onnxruntime 1.30 applies', () => {
  // Every form a converter writes for a binary classifier: leaf weights for class id 0 only (boosted
  // classifiers) or for both ids (forests), no, one or two base values, either positive column,
  // mixed-sign or all-positive weights, float and double inputs; NaN in a tenth of the cells, a
  // third of the rows on thresholds. plumbline's evaluator must give onnxruntime's probability for
  // the positive column, or leave the model to onnxruntime where it does not read the form.
  const cases = [
    { post: 'LOGISTIC', classes: 1, base: [] as number[], ours: true },
    { post: 'LOGISTIC', classes: 1, base: [0.35], ours: true },
    { post: 'LOGISTIC', classes: 1, base: [0.35, -0.2], ours: false }, // onnxruntime writes 0.5 for class 1
    { post: 'LOGISTIC', classes: 2, base: [], ours: true },
    { post: 'LOGISTIC', classes: 2, base: [0.35], ours: true },
    { post: 'LOGISTIC', classes: 2, base: [0.35, -0.2], ours: true },
    { post: 'NONE', classes: 2, base: [0.1], ours: true }, // b_0 goes to class 0 only
    { post: 'NONE', classes: 1, base: [], ours: false }, // onnxruntime's columns then depend on the weights' signs
    { post: 'PROBIT', classes: 1, base: [], ours: false }, // a normal quantile, not a probability
  ]
  for (const [input, elemType] of [['float32', OnnxDataType.FLOAT], ['float64', OnnxDataType.DOUBLE]] as const) {
    for (const { post, classes, base, ours } of cases) {
      for (const positive of [0, 1]) {
        for (const signs of ['mixed', 'positive'] as const) {
          // NONE sums weights as probabilities: negative weights would make them leave [0, 1].
          if (post === 'NONE' && signs === 'mixed') continue
          const name = `${post}, weights for class ${classes === 1 ? 'id 0' : 'ids 0 and 1'}, ${base.length} base values, positive column ${positive}, ${signs} weights, ${input}`
          it(`${name}: ${ours ? 'plumbline' : 'onnxruntime'} evaluates it`, async () => {
            const random = createRandom(elemType * 1000 + classes * 100 + base.length * 10 + positive * 2 + (signs === 'mixed' ? 1 : 0) + post.length * 7)
            const scale = post === 'NONE' ? 1 / 30 : 0.4
            const weight = signs === 'mixed' ? () => scale * random.normal() : () => scale * random.next()
            const { attributes, thresholds } = randomTrees(random, 30, classes, weight)
            const bytes = treeModel(
              { opType: 'TreeEnsembleClassifier', output: ['label', 'probabilities'], attribute: [...attributes('class'), ints('classlabels_int64s', [0, 1]), text('post_transform', post), ...(base.length > 0 ? [floats('base_values', base)] : [])] },
              elemType,
              [{ name: 'label', elemType: OnnxDataType.INT64, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', 2] }],
            )
            const model = await loadOnnxModel(bytes, { source: 'trees.onnx', task: 'binary', features, featureOrder: features.map((f) => f.name), positiveClass: positive })
            const x = rows(createRandom(positive + 40), 3000, thresholds)
            if (!ours) {
              // Not read at all: onnxruntime from the start, and no fast path.
              expect(model.engine).toBe('onnxruntime')
              expect(model.createReplacementPredictor?.(x)).toBeUndefined()
              return
            }
            const values = await model.predict(x)
            // Still ours after the first prediction's check against onnxruntime.
            expect(model.engine).toBe('plumbline-trees')
            expect(model.createReplacementPredictor?.(x)).toBeDefined()
            const reference = await onnxruntimePredict(bytes, 'probabilities', x, input, positive)
            let missing = 0
            for (let i = 0; i < x.rows; i++) {
              expect(Math.abs(values[i] - reference[i])).toBeLessThanOrEqual(1e-6)
              for (let j = 0; j < F; j++) if (Number.isNaN(x.columns[j][i])) missing++
            }
            expect(missing).toBeGreaterThan(0.05 * x.rows * F)
          })
        }
      }
    }
  }
})

describe('the report names the engine that evaluated a loaded ONNX classifier', () => {
  it('plumbline-trees for a LOGISTIC TreeEnsembleClassifier, onnxruntime for a form it does not read, side by side', async () => {
    const random = createRandom(77)
    const { attributes, thresholds } = randomTrees(random, 30, 1, () => 0.5 * random.normal())
    const classifier = (post: string, classes: OnnxAttribute[]) =>
      treeModel(
        { opType: 'TreeEnsembleClassifier', output: ['label', 'probabilities'], attribute: [...classes, ints('classlabels_int64s', [0, 1]), text('post_transform', post), floats('base_values', [0.1])] },
        OnnxDataType.DOUBLE,
        [{ name: 'label', elemType: OnnxDataType.INT64, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', 2] }],
      )
    const logistic = classifier('LOGISTIC', attributes('class'))
    // Weights for class id 0 only under NONE: a form plumbline leaves to onnxruntime (classifierTrees).
    const unread = classifier('NONE', randomTrees(createRandom(79), 30, 1, () => random.next() / 40).attributes('class'))
    const x = rows(createRandom(78), 1600, thresholds)
    const p = await onnxruntimePredict(logistic, 'probabilities', x, 'float64', 1)
    const late = Float64Array.from(p, (pi) => (random.next() < pi ? 1 : 0))
    const table = (from: number, to: number, source: string): Dataset => {
      const part = selectRows({ ...x, source, missing: features.map(() => 0), target: { name: 'late', values: late } } as Dataset, Array.from({ length: to - from }, (_, i) => from + i))
      return { ...part, missing: part.columns.map((c) => c.filter((v) => Number.isNaN(v)).length) }
    }
    const train = table(0, 1000, 'train.csv')
    const holdout = table(1000, 1600, 'holdout.csv')
    const config = parsePolicy(
      'version: 1\ntask: binary\ntarget: late\nseed: 5\ndata:\n  train: train.csv\n  holdout: holdout.csv\nmodel:\n  onnx:\n    path: model.onnx\nimportance:\n  draws: 2\n',
      { source: 'plumbline.yml' },
    )
    const load = (bytes: Uint8Array) => loadOnnxModel(bytes, { source: 'model.onnx', task: 'binary', features, featureOrder: features.map((f) => f.name) })
    const side = async (ref: string, bytes: Uint8Array): Promise<SideInputs> => ({ ref, commit: null, train, holdout, reference: train, model: { kind: 'loaded', model: await load(bytes) } })
    const report = await runGate({ config, policySource: 'plumbline.yml', policyChanged: false, base: await side('main', logistic), head: await side('pr', unread), toolVersion: 'test' })
    expect(report.sides!.base.model).toMatchObject({ engine: 'plumbline-trees' })
    expect(report.sides!.base.model.description).toContain("evaluated by plumbline's tree evaluator")
    expect(report.sides!.head.model).toMatchObject({ engine: 'onnxruntime' })
    expect(report.sides!.head.model.description).toContain('evaluated by onnxruntime')
  })
})

describe('loadOnnxModel on multiclass TreeEnsembleClassifiers (NONE and SOFTMAX): plumbline evaluates them as onnxruntime 1.30 does', () => {
  // K = 3 and 4 classes, every branch mode, random missing directions, NaN in a tenth of the cells and
  // a third of the rows on thresholds, float and double inputs. NONE: each leaf's weights are class
  // fractions over the number of trees (a forest), so a row's probabilities sum to 1. SOFTMAX: normal
  // weights and one base value per class (gradient boosting). The model's class labels are declared in
  // another order than the data's (text labels), so the column mapping is checked too.
  for (const [input, elemType] of [['float32', OnnxDataType.FLOAT], ['float64', OnnxDataType.DOUBLE]] as const) {
    for (const k of [3, 4]) {
      for (const post of ['NONE', 'SOFTMAX'] as const) {
        it(`${k} classes, post_transform ${post}, ${input} input, agrees with onnxruntime to 1e-6 and keeps the fast path`, async () => {
          const random = createRandom(elemType * 10_000 + k * 100 + post.length)
          const count = 25
          const { attributes, thresholds } = post === 'NONE'
            ? randomTrees(random, count, k, () => 0.05 + random.next(), true)
            : randomTrees(random, count, k, () => 0.3 * random.normal())
          const dataClasses = Array.from({ length: k }, (_, c) => `cls_${String.fromCharCode(97 + c)}`)
          const declared = [...dataClasses].reverse()
          const bytes = treeModel(
            {
              opType: 'TreeEnsembleClassifier',
              output: ['label', 'probabilities'],
              attribute: [
                ...attributes('class'), texts('classlabels_strings', declared), text('post_transform', post),
                ...(post === 'SOFTMAX' ? [floats('base_values', Array.from({ length: k }, () => Math.fround(0.5 * random.normal())))] : []),
              ],
            },
            elemType,
            [{ name: 'label', elemType: OnnxDataType.STRING, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', k] }],
          )
          const model = await loadOnnxModel(bytes, { source: 'trees.onnx', task: 'multiclass', features, featureOrder: features.map((f) => f.name), classes: dataClasses })
          const x = rows(createRandom(k + 50), 3000, thresholds)
          const values = await model.predict(x)
          expect(model.engine).toBe('plumbline-trees')
          expect(model.classCount).toBe(k)
          const fast = model.createReplacementPredictor?.(x)
          expect(fast).toBeDefined()
          // Column c of ours is data class c, which the model declares at position k - 1 - c.
          const reference = await Promise.all(dataClasses.map((_, c) => onnxruntimePredict(bytes, 'probabilities', x, input, k - 1 - c)))
          let worst = 0
          for (let i = 0; i < x.rows; i++) {
            for (let c = 0; c < k; c++) worst = Math.max(worst, Math.abs(values[i * k + c] - reference[c][i]))
          }
          expect(worst).toBeLessThanOrEqual(1e-6)
          // The fast path with nothing replaced is the same prediction.
          const again = fast!.predict(new Map(), 1)
          for (let i = 0; i < values.length; i++) expect(again[i]).toBeCloseTo(values[i], 12)
          const reversed = Float64Array.from({ length: 2 * x.rows }, (_, i) => x.columns[0][x.rows - 1 - (i % x.rows)])
          expect(fast!.predict(new Map([['x0', reversed]]), 2).length).toBe(2 * x.rows * k)
        })
      }
    }
  }

  it('clamps summed float32 fractions just above 1 on the fast path too, as predict does (the metrics refuse p > 1)', async () => {
    // Three trees of one split, every leaf all class 0 with the weight float32(1/3) = 0.3333333433:
    // the sum is 1.00000003, one float32 rounding above 1, on every row.
    const third = Math.fround(1 / 3)
    const attribute = [
      ints('nodes_treeids', [0, 0, 0, 1, 1, 1, 2, 2, 2]), ints('nodes_nodeids', [0, 1, 2, 0, 1, 2, 0, 1, 2]),
      ints('nodes_featureids', [0, 0, 0, 1, 0, 0, 2, 0, 0]), texts('nodes_modes', ['BRANCH_LEQ', 'LEAF', 'LEAF', 'BRANCH_LEQ', 'LEAF', 'LEAF', 'BRANCH_LEQ', 'LEAF', 'LEAF']),
      floats('nodes_values', [0, 0, 0, 0.5, 0, 0, -0.5, 0, 0]), ints('nodes_truenodeids', [1, 0, 0, 1, 0, 0, 1, 0, 0]), ints('nodes_falsenodeids', [2, 0, 0, 2, 0, 0, 2, 0, 0]),
      ints('class_treeids', [0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 2]), ints('class_nodeids', [1, 1, 1, 2, 2, 2, 1, 1, 1, 2, 2, 2, 1, 1, 1, 2, 2, 2]),
      ints('class_ids', [0, 1, 2, 0, 1, 2, 0, 1, 2, 0, 1, 2, 0, 1, 2, 0, 1, 2]), floats('class_weights', [third, 0, 0, third, 0, 0, third, 0, 0, third, 0, 0, third, 0, 0, third, 0, 0]),
      ints('classlabels_int64s', [0, 1, 2]), text('post_transform', 'NONE'),
    ]
    const bytes = treeModel({ opType: 'TreeEnsembleClassifier', output: ['label', 'probabilities'], attribute }, OnnxDataType.FLOAT, [
      { name: 'label', elemType: OnnxDataType.INT64, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', 3] },
    ])
    const model = await loadOnnxModel(bytes, { source: 'sure.onnx', task: 'multiclass', features, featureOrder: features.map((f) => f.name), classes: ['0', '1', '2'] })
    const x = rows(createRandom(3), 200, Array.from({ length: F }, () => []))
    expect(Array.from((await model.predict(x)).filter((_, i) => i % 3 === 0)).every((p) => p === 1)).toBe(true)
    expect(model.engine).toBe('plumbline-trees')
    const fast = model.createReplacementPredictor!(x)!
    const shuffled = Float64Array.from({ length: x.rows }, (_, i) => x.columns[1][(i * 7) % x.rows])
    const replaced = fast.predict(new Map([['x1', shuffled]]), 1)
    expect(Array.from(replaced.filter((_, i) => i % 3 === 0)).every((p) => p === 1)).toBe(true)
    expect(fast.predictMany!([new Map([['x2', shuffled]])], 1)[0].every((p) => p >= 0 && p <= 1)).toBe(true)
  })

  it('leaves a multiclass TreeEnsembleClassifier with post_transform LOGISTIC to onnxruntime (its rows do not sum to 1 and are refused)', async () => {
    const random = createRandom(78)
    const { attributes } = randomTrees(random, 20, 3, () => 0.3 * random.normal())
    const bytes = treeModel(
      { opType: 'TreeEnsembleClassifier', output: ['label', 'probabilities'], attribute: [...attributes('class'), ints('classlabels_int64s', [0, 1, 2]), text('post_transform', 'LOGISTIC')] },
      OnnxDataType.FLOAT,
      [{ name: 'label', elemType: OnnxDataType.INT64, dims: ['N'] }, { name: 'probabilities', elemType: OnnxDataType.FLOAT, dims: ['N', 3] }],
    )
    const model = await loadOnnxModel(bytes, { source: 'ovr.onnx', task: 'multiclass', features, featureOrder: features.map((f) => f.name), classes: ['0', '1', '2'] })
    expect(model.engine).toBe('onnxruntime')
    await expect(model.predict(rows(createRandom(5), 50, Array.from({ length: F }, () => [])))).rejects.toThrow(/^The ONNX model 'ovr.onnx' output 'probabilities' does not give class probabilities: row 1 of the rows scored sums to /)
  })
})
