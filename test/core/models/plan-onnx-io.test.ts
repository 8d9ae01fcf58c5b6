/**
 * The pure planning of an ONNX model's inputs and outputs (planOnnxInputs, onnxInputValues,
 * planOnnxOutput, readOnnxOutput), without onnxruntime: the declared inputs and outputs are written
 * here as onnxruntime-node 1.30 reports them (name, isTensor, type, shape with 'N' or -1 for a free
 * dimension), and the returned tensors as plain dims and data. Every message is asserted word for word.
 */
import { describe, expect, it } from 'vitest'
import type { FeatureInfo, FeatureMatrix } from '../../../src/core/data/dataset.ts'
import type { OnnxValueInfo } from '../../../src/core/models/onnx-value-info.ts'
import { onnxInputValues, planOnnxInputs } from '../../../src/core/models/plan-onnx-inputs.ts'
import { userErrorText as userErrorOf } from '../data/user-error-text.ts'
import { checkTreeOutput, outputWidth, planOnnxOutput, readOnnxOutput } from '../../../src/core/models/plan-onnx-output.ts'

const tensor = (name: string, type: string, shape: (number | string)[]): OnnxValueInfo => ({ name, isTensor: true, type, shape })
const noLabels = { classLabelsByOutput: new Map<string, readonly (string | number)[]>(), classLabelSets: [] }
const features: FeatureInfo[] = [
  { name: 'distance_km', kind: 'numeric' },
  { name: 'stop_count', kind: 'numeric' },
  { name: 'region', kind: 'categorical', categories: ['east', 'north'] },
]

describe('planOnnxInputs(inputs, options, metadata)', () => {
  it('plans one [N, F] matrix in the metadata order, and model.onnx.features overrides it', () => {
    const input = [tensor('X', 'float32', ['N', 2])]
    const metadata = new Map([['plumbline.features', '["stop_count", "distance_km"]']])
    expect(planOnnxInputs(input, { source: 'm.onnx', features }, metadata)).toEqual({ kind: 'matrix', name: 'X', type: 'float32', featureNames: ['stop_count', 'distance_km'] })
    expect(planOnnxInputs(input, { source: 'm.onnx', features, featureOrder: ['distance_km', 'stop_count'] }, metadata).featureNames).toEqual(['distance_km', 'stop_count'])
  })

  it('refuses a matrix without a column order, and one whose width differs from the order', () => {
    expect(userErrorOf(() => planOnnxInputs([tensor('X', 'float32', ['N', 2])], { source: 'm.onnx', features }, new Map()))).toBe(
      "The ONNX model 'm.onnx' takes one input 'X' [N, 2] and does not say which data column goes in which position.\n" +
        'Model inputs: X (float32 [N, 2])\nData columns: distance_km (numeric), stop_count (numeric), region (categorical) | ' +
        "List the columns in order under 'model.onnx.features' in plumbline.yml, or store them in the model as metadata 'plumbline.features' (a JSON array of column names).",
    )
    expect(userErrorOf(() => planOnnxInputs([tensor('X', 'float64', [-1, 3])], { source: 'm.onnx', features, featureOrder: ['distance_km'] }, new Map()))).toMatch(
      /^The ONNX model 'm.onnx' input 'X' takes 3 columns, but 'model.onnx.features' lists 1.\n/,
    )
  })

  it('plans one input per column by name, [N] or [N, 1], and fills each with its own type', () => {
    const plan = planOnnxInputs([tensor('region', 'string', ['N', 1]), tensor('stop_count', 'int64', ['N']), tensor('distance_km', 'float64', ['N', 1])], { source: 'm.onnx', features }, new Map())
    expect(plan).toEqual({
      kind: 'columns',
      featureNames: ['region', 'stop_count', 'distance_km'],
      columns: [{ name: 'region', type: 'string', rank: 2 }, { name: 'stop_count', type: 'int64', rank: 1 }, { name: 'distance_km', type: 'float64', rank: 2 }],
    })
    const byPlan = [features[2], features[1], features[0]]
    const matrix: FeatureMatrix = { rows: 3, features: byPlan, columns: [Float64Array.of(1, NaN, 0), Float64Array.of(4, 2, 7), Float64Array.of(1.5, NaN, 3)] }
    const values = onnxInputValues(plan, matrix, 1, 3, 'm.onnx')
    expect(values.region).toEqual({ type: 'string', data: ['', 'east'], dims: [2, 1] })
    expect(values.stop_count).toEqual({ type: 'int64', data: BigInt64Array.of(2n, 7n), dims: [2] })
    expect(values.distance_km.type).toBe('float64')
    expect(Array.from(values.distance_km.data as Float64Array)).toEqual([NaN, 3])
    const missing: FeatureMatrix = { ...matrix, columns: [matrix.columns[0], Float64Array.of(4, NaN, 7), matrix.columns[2]] }
    expect(userErrorOf(() => onnxInputValues(plan, missing, 0, 3, 'm.onnx'))).toBe(
      "The ONNX model 'm.onnx' takes column 'stop_count' as int64, but the data has a missing value there (row 2 of the rows scored). | " +
        "Export the model with a float input for 'stop_count' (float inputs take missing values as NaN), or fill in the column before training and scoring.",
    )
  })

  it('writes a matrix row-major in the plan type, rows start..end only', () => {
    const plan = planOnnxInputs([tensor('X', 'float32', ['N', 2])], { source: 'm.onnx', features, featureOrder: ['distance_km', 'stop_count'] }, new Map())
    const matrix: FeatureMatrix = { rows: 3, features: features.slice(0, 2), columns: [Float64Array.of(1, 2, 3), Float64Array.of(10, 20, 30)] }
    const { X } = onnxInputValues(plan, matrix, 1, 3, 'm.onnx')
    expect(X.type).toBe('float32')
    expect(X.dims).toEqual([2, 2])
    expect(Array.from(X.data as Float32Array)).toEqual([2, 20, 3, 30])
  })
})

describe('planOnnxOutput(outputs, options, labels) and readOnnxOutput(plan, returned, start, end, out)', () => {
  const classes = ['barolo', 'grignolino', 'barbera']
  const classifier = [tensor('label', 'string', ['N']), tensor('probabilities', 'float32', ['N', 3])]
  const declared = { classLabelsByOutput: new Map([['probabilities', ['barbera', 'barolo', 'grignolino']]]), classLabelSets: [['barbera', 'barolo', 'grignolino']] }

  it('reads a regression output [N] or [N, 1], and refuses a returned [N, 2]', () => {
    const plan = planOnnxOutput([tensor('variable', 'float32', ['N', 1])], { source: 'r.onnx', task: 'regression' }, noLabels)
    expect(outputWidth(plan)).toBe(1)
    const out = new Float64Array(3)
    readOnnxOutput(plan, { dims: [2], data: Float32Array.of(0.5, -2) }, 1, 3, out)
    expect(Array.from(out)).toEqual([0, 0.5, -2])
    expect(userErrorOf(() => readOnnxOutput(plan, { dims: [1, 2], data: Float32Array.of(1, 2) }, 0, 1, out))).toBe(
      "The ONNX model 'r.onnx' output 'variable' came back with shape [1, 2] for 1 rows; a regression output must be [N] or [N, 1].\n" +
        'Model outputs: variable (float32 [N, 1]) | Export the regressor with exactly one float output holding one prediction per row, [N] or [N, 1].',
    )
  })

  it('binary: the positive column by declared label, and the int64 label output beside it is not read', () => {
    const plan = planOnnxOutput([tensor('label', 'int64', ['N']), tensor('probabilities', 'float32', ['N', 2])], { source: 'b.onnx', task: 'binary', positiveClass: 1 }, { classLabelsByOutput: new Map([['probabilities', [1, 0]]]), classLabelSets: [[1, 0]] })
    expect(plan).toMatchObject({ kind: 'binary', name: 'probabilities', positive: 0 })
    const out = new Float64Array(2)
    readOnnxOutput(plan, { dims: [2, 2], data: Float32Array.of(0.25, 0.75, 1, 0) }, 0, 2, out)
    expect(Array.from(out)).toEqual([0.25, 1])
  })

  it('multiclass: the [N, K] output, its columns put in the data class order by declared label', () => {
    const plan = planOnnxOutput(classifier, { source: 'w.onnx', task: 'multiclass', classes }, declared)
    expect(plan).toMatchObject({ kind: 'multiclass', name: 'probabilities', columns: [1, 2, 0] })
    expect(outputWidth(plan)).toBe(3)
    const out = new Float64Array(6)
    // Model columns: barbera, barolo, grignolino.
    readOnnxOutput(plan, { dims: [2, 3], data: Float32Array.of(0.5, 0.25, 0.25, 0, 1, 0) }, 0, 2, out)
    expect(Array.from(out)).toEqual([0.25, 0.25, 0.5, 1, 0, 0])
  })

  it('multiclass without labels: the model column k is data class k', () => {
    const plan = planOnnxOutput([tensor('softmax', 'float64', [-1, 3])], { source: 'w.onnx', task: 'multiclass', classes }, noLabels)
    expect(plan).toMatchObject({ name: 'softmax', columns: [0, 1, 2] })
  })

  it('multiclass: refuses a declared width other than K, labels that are not the data classes, and ZipMap maps', () => {
    expect(userErrorOf(() => planOnnxOutput([tensor('probabilities', 'float32', ['N', 2])], { source: 'w.onnx', task: 'multiclass', classes }, noLabels))).toBe(
      "The ONNX model 'w.onnx' output 'probabilities' has shape [N, 2]; the data has 3 classes (barolo, grignolino, barbera), so the probabilities must be [N, 3].\n" +
        "Model outputs: probabilities (float32 [N, 2]) | Export the classifier with an output holding the class probabilities as a float tensor [N, 3] (name it 'probabilities' if it has several float outputs).",
    )
    const other = { classLabelsByOutput: new Map([['probabilities', [0, 1, 2]]]), classLabelSets: [[0, 1, 2]] }
    expect(userErrorOf(() => planOnnxOutput(classifier, { source: 'w.onnx', task: 'multiclass', classes }, other))).toBe(
      "The ONNX model 'w.onnx' declares the classes '0', '1', '2' for its output 'probabilities', but the data's classes are 'barolo', 'grignolino', 'barbera' (the model has no 'barolo', 'grignolino', 'barbera'). | " +
        'Train and export the model on the same class labels as the target column, written the same way.',
    )
    expect(userErrorOf(() => planOnnxOutput([tensor('label', 'int64', ['N']), { name: 'output_probability', isTensor: false }], { source: 'w.onnx', task: 'multiclass', classes }, noLabels))).toBe(
      "The ONNX model 'w.onnx' returns its class probabilities as a sequence of maps (output 'output_probability'), which plumbline cannot read.\n" +
        'Model outputs: label (int64 [N]), output_probability (not a tensor) | ' +
        'Export the probabilities as a plain float tensor [N, 3] instead: leave out the final ZipMap step that turns them into maps (in skl2onnx, the converter option zipmap=False).',
    )
  })

  it('multiclass: refuses a returned width other than K, a negative value and a row not summing to 1, naming the row and the class', () => {
    const plan = planOnnxOutput(classifier, { source: 'w.onnx', task: 'multiclass', classes }, declared)
    const out = new Float64Array(9)
    expect(userErrorOf(() => readOnnxOutput(plan, { dims: [3, 2], data: new Float32Array(6) }, 0, 3, out))).toBe(
      "The ONNX model 'w.onnx' output 'probabilities' came back with shape [3, 2] for 3 rows; the probabilities must be [N, 3].\n" +
        "Model outputs: label (string [N]), probabilities (float32 [N, 3]) | Export the classifier with an output holding the class probabilities as a float tensor [N, 3] (name it 'probabilities' if it has several float outputs).",
    )
    // Rows 4 to 6 of the data in this batch; the second has -0.25 for model column 2 (grignolino).
    expect(userErrorOf(() => readOnnxOutput(plan, { dims: [2, 3], data: Float64Array.of(0.2, 0.3, 0.5, 0.75, 0.5, -0.25) }, 3, 5, new Float64Array(15)))).toBe(
      "The ONNX model 'w.onnx' output 'probabilities' is not a probability: row 5 of the rows scored has -0.25 for the class 'grignolino' (column 2 of the model's 3). | " +
        'Export the model with its probability step (a softmax post-transform), not raw scores.',
    )
    expect(userErrorOf(() => readOnnxOutput(plan, { dims: [1, 3], data: Float64Array.of(0.5, 0.5, 0.5) }, 0, 1, out))).toBe(
      "The ONNX model 'w.onnx' output 'probabilities' does not give class probabilities: row 1 of the rows scored sums to 1.5, not 1 (within 0.0001) over its 3 class columns. | " +
        'Export the model with its probability step (a softmax post-transform), not raw or one-vs-rest scores.',
    )
  })

  it('multiclass: clamps float32 rounding just outside [0, 1] and takes a row 5e-5 from 1 (within the tolerance)', () => {
    const plan = planOnnxOutput(classifier, { source: 'w.onnx', task: 'multiclass', classes }, declared)
    const out = new Float64Array(6)
    const above = Math.fround(1 + 2 ** -22) // 1 + 2 float32 ulps
    readOnnxOutput(plan, { dims: [2, 3], data: Float32Array.of(0, above, 0, 0.33335, 0.33335, 0.33335) }, 0, 2, out)
    expect(out[0]).toBe(1)
    expect(out[3] + out[4] + out[5]).toBeCloseTo(1.00005, 5)
    expect(() => checkTreeOutput(plan, Float64Array.of(0.2, 0.2, 0.2))).toThrow(/^The ONNX model 'w.onnx' tree ensemble does not give class probabilities: row 1 of the rows scored sums to 0.6/)
  })
})
