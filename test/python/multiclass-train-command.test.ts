/**
 * `task: multiclass` with the repository's own training command, end to end through the CLI (main())
 * as a real process tree: plumbline runs softmax-train.py (NumPy and python3-onnx from Debian, at
 * /usr/bin/python3) in each side's checkout once per refit, and loads the [N, K] probability output
 * of the ONNX model it writes (the contract in docs/policy.md, `model.train`). Data: scikit-learn's
 * wine table (Debian python3-sklearn 1.2.1), every fourth row held out, target written as text.
 * - The contract kept: a pull request adding a column of pure noise passes, every refit trained by
 *   the command; one adding a label copy (the cultivar, 5% of rows given another) blocks.
 * - The contract broken, each a UserError (exit 2) naming the file, the row and the class column:
 *   one-vs-rest sigmoids (rows that do not sum to 1), negative values in rows that sum to 1, and only two
 *   probability columns for three classes.
 */
import { join } from 'node:path'
import { dirname } from 'node:path'
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { afterAll, describe, expect, it } from 'vitest'
import { main } from '../../src/adapters/cli/main.ts'
import type { GateReport } from '../../src/core/report/report.ts'
import { createRandom } from '../../src/core/statistics/random.ts'
import { makeRepository, type TestRepository } from '../helpers/make-repository.ts'
import { hasWine, readWine, wineCsvText } from '../helpers/wine-table.ts'
import { pythonMissing, reportSkip } from './python-tools.ts'

reportSkip('test/python/multiclass-train-command.test.ts')

const script = readFileSync(join(dirname(fileURLToPath(import.meta.url)), 'softmax-train.py'), 'utf8')

function policy(output: 'softmax' | 'sigmoid' | 'shifted' | 'two'): string {
  return [
    'version: 1', 'task: multiclass', 'target: cultivar', 'seed: 5',
    'data:', '  train: data/train.csv', '  holdout: data/holdout.csv',
    'model:', '  train:', `    command: /usr/bin/python3 -B tools/softmax_train.py cultivar --output ${output}`, '    timeout_seconds: 120', '    parallel: 2',
    'importance:', '  draws: 3', '  refits: 3', '',
  ].join('\n')
}

const repositories: TestRepository[] = []
afterAll(() => repositories.forEach((r) => r.remove()))

async function check(output: Parameters<typeof policy>[0], change: 'noise' | 'copy-5'): Promise<{ code: number; text: string; report?: GateReport }> {
  const table = readWine()
  const all = table.target.map((_, i) => i)
  const holdout = all.filter((i) => i % 4 === 0)
  const train = all.filter((i) => i % 4 !== 0)
  const random = createRandom(change === 'noise' ? 21 : 22)
  const values = change === 'noise' ? table.target.map(() => random.normal()) : table.target.map((y) => (random.next() >= 0.05 ? y : (y + 1 + random.int(2)) % 3))
  const extra = { name: change === 'noise' ? 'batch_noise' : 'lab_grade', values }
  const repository = makeRepository({
    base: {
      'plumbline.yml': policy(output),
      'tools/softmax_train.py': script,
      'data/train.csv': wineCsvText(table, train),
      'data/holdout.csv': wineCsvText(table, holdout),
    },
    head: { 'data/train.csv': wineCsvText(table, train, extra), 'data/holdout.csv': wineCsvText(table, holdout, extra) },
  })
  repositories.push(repository)
  const reportPath = join(repository.root, 'report.json')
  let text = ''
  const code = await main(['check', '--base', 'main', '--head', 'pr', '--json', reportPath], {
    cwd: repository.root,
    stdout: (t) => (text += t),
    stderr: (t) => (text += t),
    isTty: false,
  })
  return { code, text, report: code < 2 ? (JSON.parse(readFileSync(reportPath, 'utf8')) as GateReport) : undefined }
}

describe.skipIf(pythonMissing !== undefined || !hasWine)('task: multiclass with a training command (softmax-train.py) on the wine table', () => {
  it('the contract kept: a noise column passes, every refit trained by the command and loaded as [N, 3] probabilities', async () => {
    const { code, text, report } = await check('softmax', 'noise')
    expect(code, text).toBe(0)
    expect(report!.verdict).toBe('pass')
    expect(report!.settings.task).toBe('multiclass')
    expect(report!.settings.classes).toEqual(['class_0', 'class_1', 'class_2'])
    for (const side of ['base', 'head'] as const) {
      expect(report!.sides![side]?.model.kind).toBe('onnx')
      for (let refit = 0; refit < 3; refit++) expect(text).toContain(`${side} refit ${refit}: trained in`)
    }
    expect(report!.findings.filter((f) => f.kind === 'leakage')).toEqual([])
  })

  it('the contract kept: a label copy blocks and is named', async () => {
    const { code, text, report } = await check('softmax', 'copy-5')
    expect(code, text).toBe(1)
    expect(report!.verdict).toBe('block')
    expect(report!.headline).toMatch(/^Blocked: lab_grade, new here,/)
  })

  it('one-vs-rest sigmoids: refused, naming the file, the row and the sum', async () => {
    const { code, text } = await check('sigmoid', 'noise')
    expect(code).toBe(2)
    expect(text).toMatch(/The ONNX model '\$PLUMBLINE_OUTPUT of (base|head) refit \d' output 'probabilities' does not give class probabilities: row 1 of the rows scored sums to [0-9.]+, not 1 \(within 0\.0001\) over its 3 class columns\.\nExport the model with its probability step \(a softmax post-transform\), not raw or one-vs-rest scores\./)
  })

  it('a negative probability (rows summing to 1): refused at the first one, naming the file, the row and the class column', async () => {
    const { code, text } = await check('shifted', 'noise')
    expect(code).toBe(2)
    const refused = text.match(/The ONNX model '\$PLUMBLINE_OUTPUT of (base|head) refit \d' output 'probabilities' is not a probability: row (\d+) of the rows scored has -[0-9.e-]+ for the class 'class_0' \(column 0 of the model's 3\)\.\nExport the model with its probability step \(a softmax post-transform\), not raw scores\./)
    expect(refused, text).not.toBeNull()
    // The holdout starts with 15 class_0 rows (wine rows 0, 4, ..., 56), where the first class is likely:
    // the first negative value comes later, and the row named is that one.
    expect(Number(refused![2])).toBeGreaterThan(1)
  })

  it('two probability columns for three classes: refused when the model is loaded, naming the output and the classes', async () => {
    const { code, text } = await check('two', 'noise')
    expect(code).toBe(2)
    // Every refit fails this way; the message shown is the first failure's own, not that of a refit
    // stopped because of it (executeInProcess surfaces the earliest failure).
    expect(text).not.toContain('was stopped because')
    expect(text).toMatch(/The ONNX model '\$PLUMBLINE_OUTPUT of (base|head) refit \d' output 'probabilities' has shape \[\?, 2\]; the data has 3 classes \(class_0, class_1, class_2\), so the probabilities must be \[N, 3\]\.\nModel outputs: probabilities \(float64 \[\?, 2\]\)\n/)
  })
})
