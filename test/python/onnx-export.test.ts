/**
 * sample-repo/python/onnx_export.py, read back by plumbline: python/train.py fits each learner with
 * scikit-learn 1.2.1 (Debian python3-sklearn) on the courier demo data, writes the model through
 * onnx_export.py and scikit-learn's own predict_proba for the holdout rows (--holdout-predictions);
 * loadOnnxModel runs the ONNX file in onnxruntime on the same rows, read by plumbline's CSV reader.
 * The reference is scikit-learn's predict_proba; the tolerance 1e-6 leaves room only for the
 * float32 outputs of the tree operators (about 6e-8 relative).
 */
import { readFileSync, rmSync, writeFileSync, mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadOnnxModel } from '../../src/adapters/onnx/load-onnx-model.ts'
import { readDataset } from '../../src/adapters/files/read-dataset.ts'
import { selectFeatures, type Dataset } from '../../src/core/data/dataset.ts'
import { schemaOf } from '../../src/core/data/parse-csv.ts'
import { pythonMissing, reportSkip, runPython, trainScript, writeCourierData } from './python-tools.ts'

reportSkip('test/python/onnx-export.test.ts')

const courier = { target: 'late', task: 'binary' as const, roles: { parcel_id: 'id' as const }, requireTarget: true }
const runs = [
  { name: 'gradient-boosting', args: ['--model', 'gradient-boosting', '--trees', '60'], holdout: 'holdout.csv', leaveOut: '' },
  { name: 'random-forest', args: ['--model', 'random-forest', '--trees', '30', '--max-depth', '8'], holdout: 'holdout.csv', leaveOut: '' },
  { name: 'logistic', args: ['--model', 'logistic'], holdout: 'holdout.csv', leaveOut: '' },
  // The in-graph preprocessing on cells the training rows never had: the same holdout with blanked
  // distances, a depot the model never saw and missing shifts; two columns left out.
  { name: 'logistic-gaps', args: ['--model', 'logistic'], holdout: 'holdout-gaps.csv', leaveOut: 'stop_count,rain_forecast_mm' },
] as const

/** The holdout with every 7th distance blank, every 11th depot 'seaport' (not in training), every 13th shift NA. */
function withGaps(text: string): string {
  const [header, ...lines] = text.trim().split('\n')
  const names = header.split(',')
  const [distance, depot, shift] = ['distance_km', 'depot', 'driver_shift'].map((n) => names.indexOf(n))
  return [header, ...lines.map((line, i) => {
    const cells = line.split(',')
    if (i % 7 === 0) cells[distance] = ''
    if (i % 11 === 0) cells[depot] = 'seaport'
    if (i % 13 === 0) cells[shift] = 'NA'
    return cells.join(',')
  })].join('\n') + '\n'
}

describe.skipIf(pythonMissing !== undefined)('onnx_export.py models loaded with loadOnnxModel (courier demo data)', () => {
  let directory = ''
  let data = ''
  let train: Dataset

  beforeAll(async () => {
    directory = mkdtempSync(join(tmpdir(), 'plumbline-onnx-export-'))
    data = join(directory, 'data')
    writeCourierData(directory)
    writeFileSync(join(data, 'holdout-gaps.csv'), withGaps(readFileSync(join(data, 'holdout.csv'), 'utf8')))
    train = await readDataset(join(data, 'train.csv'), courier)
    await Promise.all(runs.map((run) => runPython([trainScript, ...run.args, '--holdout-predictions', `${run.name}.txt`], {
      cwd: directory,
      env: {
        PLUMBLINE_TRAIN: join(data, 'train.csv'),
        PLUMBLINE_HOLDOUT: join(data, run.holdout),
        PLUMBLINE_OUTPUT: join(directory, `${run.name}.onnx`),
        PLUMBLINE_SEED: '20261201',
        PLUMBLINE_LEAVE_OUT: run.leaveOut,
      },
    })))
  })
  afterAll(() => {
    if (directory) rmSync(directory, { recursive: true, force: true })
  })

  async function largestDifference(run: (typeof runs)[number]) {
    const holdout = await readDataset(join(data, run.holdout), { ...courier, schema: schemaOf(train) })
    const model = await loadOnnxModel(new Uint8Array(readFileSync(join(directory, `${run.name}.onnx`))), {
      source: `${run.name}.onnx`,
      task: 'binary',
      features: train.features,
    })
    const predicted = await model.predict(selectFeatures(holdout, model.featureNames))
    const expected = readFileSync(join(directory, `${run.name}.txt`), 'utf8').trim().split('\n').map(Number)
    expect(predicted.length).toBe(expected.length)
    let largest = 0
    for (let i = 0; i < expected.length; i++) largest = Math.max(largest, Math.abs(predicted[i] - expected[i]))
    return { largest, model, holdout }
  }

  it.each(runs.slice(0, 3))('$name: onnxruntime gives scikit-learn’s predict_proba to 1e-6 on the holdout', async (run) => {
    const { largest, model, holdout } = await largestDifference(run)
    expect(holdout.rows).toBe(1194)
    expect(model.featureNames).toEqual(train.features.map((f) => f.name))
    expect(largest).toBeLessThan(1e-6)
  })

  it('logistic: left-out columns are not inputs, and missing cells and an unseen depot are handled as in train.py', async () => {
    const { largest, model, holdout } = await largestDifference(runs[3])
    expect(model.featureNames).toEqual(['depot', 'distance_km', 'promised_window_h', 'driver_shift', 'parcel_weight_kg'])
    // plumbline reads 'seaport' as an unseen category (NaN) and NA as missing; the graph sees ''.
    expect(holdout.unseenCategories).toEqual({ depot: 109 })
    expect(holdout.missing[holdout.features.findIndex((f) => f.name === 'distance_km')]).toBe(171)
    expect(largest).toBeLessThan(1e-6)
  })
})
