import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { selectFeatures, type FeatureInfo, type FeatureMatrix } from '../../../src/core/data/dataset.ts'
import { UserError } from '../../../src/core/errors.ts'
import { loadOnnxModel, type OnnxModelOptions } from '../../../src/adapters/onnx/load-onnx-model.ts'

// The models are built by test/fixtures/onnx/make-models.py; every expected value below is worked
// by hand from the weights, thresholds and leaves written in that script.
const fixture = (name: string) => new Uint8Array(readFileSync(new URL(`../../fixtures/onnx/${name}`, import.meta.url)))

const numeric = (name: string): FeatureInfo => ({ name, kind: 'numeric' })
const REGIONS: FeatureInfo = { name: 'region', kind: 'categorical', categories: ['east', 'north', 'south'] }

/** A column-major matrix from rows written out row by row. */
function matrix(features: FeatureInfo[], rows: number[][]): FeatureMatrix {
  return {
    rows: rows.length,
    features,
    columns: features.map((_, j) => Float64Array.from(rows, (row) => row[j])),
  }
}

async function rejection(promise: Promise<unknown>): Promise<UserError> {
  const error = await promise.then(() => undefined, (e: unknown) => e)
  expect(error).toBeInstanceOf(UserError)
  return error as UserError
}

const load = (name: string, options: Partial<OnnxModelOptions> & Pick<OnnxModelOptions, 'features'>) =>
  loadOnnxModel(fixture(name), { source: `models/${name}`, task: 'regression', evaluator: 'onnxruntime', ...options })

describe('loadOnnxModel(bytes, options) with one [N, F] input', () => {
  // Data columns in another order than the model's, plus one the model does not read.
  const data = matrix(
    [numeric('hour'), numeric('distance_km'), numeric('region_code'), numeric('stop_count')],
    [
      [4, 2, 0, 1],
      [8, 10, 1, 0],
      [0, 0, 2, 3],
      [1, NaN, 0, 1],
      [12, 6, 1, 2],
    ],
  )

  it('takes the column order from the model metadata plumbline.features and computes X @ w + b', async () => {
    const model = await load('linear-regressor.onnx', { features: data.features })
    expect(model.kind).toBe('onnx')
    expect(model.splitStatistics).toBeUndefined()
    expect(model.featureNames).toEqual(['distance_km', 'stop_count', 'hour'])
    const y = await model.predict(selectFeatures(data, model.featureNames))
    // By hand: y = 0.5 * distance_km - 2 * stop_count + 0.25 * hour + 1; NaN in, NaN out.
    expect(Array.from(y.subarray(0, 3))).toEqual([1, 8, -5])
    expect(y[3]).toBeNaN()
    expect(y[4]).toBeCloseTo(0.5 * 6 - 2 * 2 + 0.25 * 12 + 1, 6)
  })

  it('lets featureOrder (model.onnx.features) override the metadata order', async () => {
    const model = await load('linear-regressor.onnx', { features: data.features, featureOrder: ['stop_count', 'distance_km', 'hour'] })
    const y = await model.predict(selectFeatures(data, model.featureNames))
    // By hand, with stop_count in the first position: y = 0.5 * stop_count - 2 * distance_km + 0.25 * hour + 1.
    expect(Array.from(y.subarray(0, 3))).toEqual([-1.5, -17, 2.5])
  })

  it('gives the same predictions whatever batchRows is', async () => {
    const features = [numeric('distance_km'), numeric('stop_count'), numeric('hour')]
    const rows = Array.from({ length: 1001 }, (_, i) => [(i * 7) % 31, i % 5, (i * 3) % 24])
    const big = matrix(features, rows)
    const whole = await (await load('linear-regressor.onnx', { features })).predict(big)
    const chunked = await (await load('linear-regressor.onnx', { features, batchRows: 64 })).predict(big)
    const single = await (await load('linear-regressor.onnx', { features, batchRows: 1 })).predict(matrix(features, rows.slice(0, 7)))
    expect(chunked).toEqual(whole)
    expect(single).toEqual(whole.subarray(0, 7))
    // By hand for row 1000: distance 1000*7 mod 31 = 25, stops 0, hour 3000 mod 24 = 0 -> 13.5.
    expect(whole[1000]).toBe(13.5)
  })

  it('evaluates a TreeEnsembleRegressor with its missing-value branches', async () => {
    const features = [numeric('distance_km'), numeric('stop_count')]
    const model = await load('tree-regressor.onnx', { features, featureOrder: ['distance_km', 'stop_count'] })
    const y = await model.predict(matrix(features, [[5, 2], [20, 2], [5, 8], [20, 8], [NaN, 8], [20, NaN], [10, 3]]))
    // By hand: 10 + tree0 + tree1, e.g. (20, NaN): tree0 x1 missing -> false branch 4.0, tree1 missing -> true 0.25.
    expect(Array.from(y)).toEqual([11.75, 12.25, 11, 13.5, 11, 14.25, 11.75])
  })

  it('refuses a single input without a column order, saying to set model.onnx.features', async () => {
    const error = await rejection(load('tree-regressor.onnx', { features: [numeric('distance_km'), numeric('stop_count')] }))
    expect(error.message).toBe(
      "The ONNX model 'models/tree-regressor.onnx' takes one input 'X' [N, 2] and does not say which data column goes in which position.\n" +
        'Model inputs: X (float32 [N, 2])\n' +
        'Data columns: distance_km (numeric), stop_count (numeric)',
    )
    expect(error.fix).toBe(
      "List the columns in order under 'model.onnx.features' in plumbline.yml, or store them in the model as metadata 'plumbline.features' (a JSON array of column names).",
    )
  })

  it('refuses a column order naming a column the data lacks, or of the wrong length', async () => {
    const features = [numeric('distance_km'), numeric('stop_count')]
    const unknown = await rejection(load('tree-regressor.onnx', { features, featureOrder: ['distance_km', 'stops'] }))
    expect(unknown.message).toBe(
      "The ONNX model 'models/tree-regressor.onnx' reads column 'stops' (from 'model.onnx.features'), which the data does not have.\n" +
        'Model inputs: X (float32 [N, 2])\n' +
        'Data columns: distance_km (numeric), stop_count (numeric)',
    )
    const short = await rejection(load('linear-regressor.onnx', { features, featureOrder: ['distance_km', 'stop_count'] }))
    expect(short.message.split('\n')[0]).toBe(
      "The ONNX model 'models/linear-regressor.onnx' input 'X' takes 3 columns, but 'model.onnx.features' lists 2.",
    )
    const twice = await rejection(load('tree-regressor.onnx', { features, featureOrder: ['stop_count', 'stop_count'] }))
    expect(twice.message.split('\n')[0]).toBe(
      "The column order for the ONNX model 'models/tree-regressor.onnx' ('model.onnx.features') lists 'stop_count' twice.",
    )
  })

  it('refuses a classifier loaded for a regression task', async () => {
    const error = await rejection(load('tree-classifier.onnx', { features: [numeric('distance_km'), numeric('stop_count')] }))
    expect(error.message).toBe(
      "The ONNX model 'models/tree-classifier.onnx' output 'probabilities' has shape [N, 2]; a regression output must be [N] or [N, 1].\n" +
        'Model outputs: label (string [N]), probabilities (float32 [N, 2])',
    )
  })

  it('refuses a corrupted or truncated file, naming it and keeping onnxruntime’s reason', async () => {
    const error = await rejection(load('truncated.onnx', { features: [] }))
    expect(error.message).toBe(
      "Could not load the ONNX model 'models/truncated.onnx': Failed to load model because protobuf parsing failed.",
    )
    expect(error.fix).toBe(
      "Check that 'models/truncated.onnx' is a complete .onnx file: export it again, and if it is stored with Git LFS, check it out with LFS so that the file is not a pointer.",
    )
    const text = await rejection(loadOnnxModel(new TextEncoder().encode('version https://git-lfs.github.com/spec/v1\n'), { source: 'late.onnx', task: 'binary', features: [] }))
    expect(text.message).toMatch(/^Could not load the ONNX model 'late.onnx': /)
  })

  it('refuses a matrix whose features are not featureNames in order', async () => {
    const model = await load('linear-regressor.onnx', { features: data.features })
    await expect(model.predict(data)).rejects.toThrow(RangeError)
  })
})

describe('loadOnnxModel(bytes, options) for a binary task', () => {
  const features = [numeric('distance_km'), numeric('stop_count')]
  const rows = matrix(features, [[5, 2], [20, 2], [5, 8], [20, 8], [NaN, 8]])
  // By hand: P(late) = tree0 (0.05 | 0.35 by distance_km <= 10, missing -> true) + tree1 (0.1 | 0.3 by stop_count <= 4).
  const late = [0.15, 0.45, 0.35, 0.65, 0.35]
  const onTime = late.map((p) => 1 - p)
  const binary = (name: string, positiveClass?: string | number) => load(name, { task: 'binary', features, positiveClass })
  const expectProbabilities = (actual: Float64Array, expected: number[]) =>
    expected.forEach((p, i) => expect(actual[i]).toBeCloseTo(p, 6))

  it('reads the probabilities output, column 1 by default', async () => {
    const model = await binary('tree-classifier.onnx')
    expect(model.task).toBe('binary')
    expectProbabilities(await model.predict(rows), onTime)
  })

  it('picks the column of positiveClass by declared label or by index', async () => {
    expectProbabilities(await (await binary('tree-classifier.onnx', 'late')).predict(rows), late)
    expectProbabilities(await (await binary('tree-classifier.onnx', 0)).predict(rows), late)
    expectProbabilities(await (await binary('tree-classifier.onnx', 1)).predict(rows), onTime)
  })

  it('treats a number as a label when the model declares integer labels, and defaults to label 1', async () => {
    // tree-classifier-int-labels.onnx declares [1, 0]: column 0 is label 1 (the late column).
    expectProbabilities(await (await binary('tree-classifier-int-labels.onnx')).predict(rows), late)
    expectProbabilities(await (await binary('tree-classifier-int-labels.onnx', 0)).predict(rows), onTime)
    expectProbabilities(await (await binary('tree-classifier-int-labels.onnx', '1')).predict(rows), late)
  })

  it('refuses a positiveClass the model does not declare', async () => {
    const label = await rejection(binary('tree-classifier.onnx', 'delayed'))
    expect(label.message).toBe("positive_class 'delayed' is not one of the classes the ONNX model 'models/tree-classifier.onnx' declares: 'late', 'on_time'.")
    expect(label.fix).toBe("Set 'model.onnx.positive_class' to one of those labels, or to the probability column 0 or 1.")
    const index = await rejection(binary('tree-classifier.onnx', 2))
    expect(index.message).toBe("positive_class 2 is not a probability column of the ONNX model 'models/tree-classifier.onnx': its output 'probabilities' has columns 0 and 1.")
    const integer = await rejection(binary('tree-classifier-int-labels.onnx', 2))
    expect(integer.message).toBe("positive_class '2' is not one of the classes the ONNX model 'models/tree-classifier-int-labels.onnx' declares: '1', '0'.")
    expect(integer.fix).toBe("Set 'model.onnx.positive_class' to one of those labels.")
  })

  it('refuses ZipMap probabilities with a message on exporting plain tensors', async () => {
    const error = await rejection(binary('zipmap-classifier.onnx'))
    expect(error.message).toBe(
      "The ONNX model 'models/zipmap-classifier.onnx' returns its class probabilities as a sequence of maps (output 'output_probability'), which plumbline cannot read.\n" +
        'Model outputs: output_label (int64 [N]), output_probability (not a tensor)',
    )
    expect(error.fix).toBe(
      'Export the probabilities as a plain float tensor [N, 2] instead: leave out the final ZipMap step that turns them into maps (in skl2onnx, the converter option zipmap=False).',
    )
  })

  it('refuses a regressor loaded for a binary task', async () => {
    const error = await rejection(load('tree-regressor.onnx', { task: 'binary', features, featureOrder: ['distance_km', 'stop_count'] }))
    expect(error.message).toBe(
      "The ONNX model 'models/tree-regressor.onnx' output 'variable' has shape [N, 1]; a binary model's probabilities must be [N, 2].\n" +
        'Model outputs: variable (float32 [N, 1])',
    )
  })
})

describe('loadOnnxModel(bytes, options) with one input per column', () => {
  const features = [numeric('hour'), numeric('distance_km'), numeric('weight_kg'), numeric('stop_count'), REGIONS]
  const columnsLine = 'Data columns: hour (numeric), distance_km (numeric), weight_kg (numeric), stop_count (numeric), region (categorical)'
  const inputsLine = 'Model inputs: distance_km (float32 [N, 1]), weight_kg (float64 [N, 1]), stop_count (int64 [N, 1]), region (string [N, 1])'
  // region codes: 0 east, 1 north, 2 south (FeatureInfo.categories order).
  const data = matrix(features, [
    [9, 5, 1, 2, 1],
    [9, 20, 1, 2, NaN],
    [9, 5, 2, 3, 2],
    [9, 5, 4, 4, 0],
    [9, NaN, 1, 9, 0],
    [9, NaN, 1, 2, 1],
  ])

  it('feeds float, double, int64 and string inputs by name, decoding categories and missing as the empty string', async () => {
    const model = await load('per-column-regressor.onnx', { features })
    expect(model.featureNames).toEqual(['distance_km', 'weight_kg', 'stop_count', 'region'])
    const y = await model.predict(selectFeatures(data, model.featureNames))
    // By hand through the LabelEncoder (north 10, south 20, east 30, '' -> -1) and the one tree;
    // row 2: region missing -> '' -> -1 <= 15, distance 20 > 10 -> 2; row 6: distance NaN is not <= 10 -> 2.
    expect(Array.from(y)).toEqual([1, 2, 3, 5, 7, 2])
  })

  it('refuses missing or fractional values for an int64 input', async () => {
    const model = await load('per-column-regressor.onnx', { features })
    const missing = selectFeatures(matrix(features, [[0, 1, 1, 2, 1], [0, 1, 1, NaN, 1]]), model.featureNames)
    const error = await rejection(model.predict(missing))
    expect(error.message).toBe(
      "The ONNX model 'models/per-column-regressor.onnx' takes column 'stop_count' as int64, but the data has a missing value there (row 2 of the rows scored).",
    )
    expect(error.fix).toBe(
      "Export the model with a float input for 'stop_count' (float inputs take missing values as NaN), or fill in the column before training and scoring.",
    )
    const fractional = selectFeatures(matrix(features, [[0, 1, 1, 2.5, 1]]), model.featureNames)
    expect((await rejection(model.predict(fractional))).message).toBe(
      "The ONNX model 'models/per-column-regressor.onnx' takes column 'stop_count' as int64, but the data has the value 2.5 there (row 1 of the rows scored).",
    )
  })

  it('refuses an input that matches no data column, listing inputs and columns', async () => {
    const error = await rejection(load('per-column-regressor.onnx', { features: features.filter((f) => f.name !== 'weight_kg') }))
    expect(error.message).toBe(
      "The ONNX model 'models/per-column-regressor.onnx' has an input 'weight_kg' that matches no data column.\n" +
        inputsLine +
        '\n' +
        'Data columns: hour (numeric), distance_km (numeric), stop_count (numeric), region (categorical)',
    )
    expect(error.fix).toBe(
      "Name each model input after the data column it reads, or export one float input [N, F] and list its columns in order under 'model.onnx.features'.",
    )
  })

  it('refuses a string input for a numeric column', async () => {
    const error = await rejection(load('per-column-regressor.onnx', { features: features.map((f) => (f.name === 'region' ? numeric('region') : f)) }))
    expect(error.message).toBe(
      "The ONNX model 'models/per-column-regressor.onnx' input 'region' is a string tensor, but data column 'region' is numeric.\n" +
        inputsLine +
        '\n' +
        columnsLine.replace('region (categorical)', 'region (numeric)'),
    )
    expect(error.fix).toBe(
      "Declare the column categorical under 'data.columns' in plumbline.yml, or export the model with a float input for 'region'.",
    )
  })
})
