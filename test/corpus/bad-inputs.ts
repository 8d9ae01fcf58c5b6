/**
 * The corpus of bad input (issue 12): generated cases across CSV, YAML policies, ONNX bytes, event
 * payloads, git refs, commands, paths and report content. Each case names its exact class of
 * outcome: 'user-error' with the message it must match (a UserError naming the problem), or
 * 'accepted' with what must hold of the result. Never a crash, a pass of a run that should fail, a
 * hang, a read outside the checkout, or a secret in the printed message: corpus.test.ts checks those
 * for every case. Cases call the in-process entry points; the CLI sample runs the real process.
 *
 * All data is invented (the fictional courier Northwind Parcel) or made from the project's own
 * fixtures (test/fixtures/onnx, test/core/report/courier-report.ts).
 */
import { execFileSync } from 'node:child_process'
import { mkdirSync, readFileSync, symlinkSync, truncateSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { runPrepare } from '../../src/adapters/check/run-prepare.ts'
import { readDataset } from '../../src/adapters/files/read-dataset.ts'
import { readConfinedFile } from '../../src/adapters/files/confined-file.ts'
import { readInputs } from '../../src/adapters/action/inputs.ts'
import { resolveCommit } from '../../src/adapters/git/git.ts'
import { parsePullRequestEvent } from '../../src/adapters/github/pull-request.ts'
import { loadOnnxModel } from '../../src/adapters/onnx/load-onnx-model.ts'
import { parseCsv } from '../../src/core/data/parse-csv.ts'
import { UserError } from '../../src/core/errors.ts'
import { parsePolicy } from '../../src/core/policy/parse-policy.ts'
import { renderMarkdown } from '../../src/core/report/render-markdown.ts'
import { parseGateReport } from '../../src/core/report/report-schema.ts'
import { createRandom } from '../../src/core/statistics/random.ts'
import { courierReport } from '../core/report/courier-report.ts'
import { smallPolicy } from '../helpers/make-repository.ts'

export type Family = 'csv' | 'yaml' | 'onnx' | 'event' | 'git-ref' | 'command' | 'path' | 'report' | 'action-input'

export type Expected =
  | { readonly outcome: 'user-error'; readonly message: RegExp }
  | { readonly outcome: 'accepted'; readonly check?: (result: unknown) => void }

export interface CorpusCase {
  readonly family: Family
  readonly name: string
  readonly run: () => Promise<unknown>
  readonly expect: Expected
}

/** The secret every case must keep out of its messages (set as GITHUB_TOKEN and INPUT_TOKEN by the test). */
export const corpusToken = 'ghs_CorpusSecretToken_5e1d0c9b8a77'
/** Text inside files outside the checkout: it must never appear in a message or a result. */
export const outsideSentinel = 'OUTSIDE_CHECKOUT_SENTINEL_42'

const userError = (message: RegExp): Expected => ({ outcome: 'user-error', message })
const accepted = (check?: (result: unknown) => void): Expected => ({ outcome: 'accepted', ...(check ? { check } : {}) })

function assert(condition: boolean, what: string): void {
  if (!condition) throw new Error(`corpus check failed: ${what}`)
}

// ---------------------------------------------------------------------------------------------
// CSV

/** 30 invented parcels: id, distance, depot, late. */
function goodRows(): string[] {
  const random = createRandom(12)
  const depots = ['harbour', 'airport', 'ringroad']
  return Array.from({ length: 30 }, (_, i) => `P${1000 + i},${(2 + 20 * random.next()).toFixed(2)},${depots[i % 3]},${i % 3 === 0 ? 1 : 0}`)
}
const header = 'parcel_id,distance_km,depot,late'
const csvOptions = { source: 'data/train.csv', target: 'late', roles: { parcel_id: 'id' as const } }

function csvCases(): CorpusCase[] {
  const cases: CorpusCase[] = []
  const parse = (text: string, options: Partial<Parameters<typeof parseCsv>[1]> = {}) => async () => parseCsv(text, { ...csvOptions, ...options })
  const add = (name: string, text: string, expect: Expected, options: Partial<Parameters<typeof parseCsv>[1]> = {}) =>
    cases.push({ family: 'csv', name, run: parse(text, options), expect })
  const rows = goodRows()
  const withCell = (value: string) => [header, ...rows.slice(0, 5), `P9,${value},harbour,0`, ...rows.slice(5)].join('\n')
  const numericRoles = { roles: { parcel_id: 'id' as const, distance_km: 'numeric' as const } }

  // A declared numeric column with a cell that is no finite decimal number.
  const notNumbers = ['abc', '"1,5"', '0x1F', '12abc', '--1', '1..2', '+-1', '.', 'e5', '1e', '∞', '١٢', '１２', '1_000', '$5', '5%', 'true', '1 2', '0b101']
  add('quote after a quoted field', withCell('"  "x'), userError(/data\/train\.csv, line 7 \(the header is line 1\): /))
  for (const value of notNumbers) add(`numeric column holds ${value}`, withCell(value), userError(/line 7 \(the header is line 1\), column 'distance_km': .* is not a number, but the column is declared numeric\./), numericRoles)
  const outOfRange = ['1e309', '-1e309', 'inf', '-inf', 'Infinity', '+Infinity', 'INF', '1e308', '-1e101', '9'.repeat(400)]
  for (const value of outOfRange) add(`number out of range ${value.slice(0, 20)}`, withCell(value), userError(/column 'distance_km': .* is not a finite number within ±1e100/))
  for (const value of ['NA', 'na', 'NaN', 'null', '', '  ']) {
    add(`missing marker ${JSON.stringify(value)}`, withCell(value), accepted((d) => assert((d as { missing: number[] }).missing[0] === 1, 'one missing distance')), numericRoles)
  }
  // Target problems.
  add('target cell empty', [header, ...rows.slice(0, 3), 'P9,3.5,harbour,', ...rows.slice(3)].join('\n'), userError(/column 'late': the target is missing \(the cell is empty\)/))
  add('target NA', [header, ...rows.slice(0, 3), 'P9,3.5,harbour,NA', ...rows.slice(3)].join('\n'), userError(/the target is missing \(the cell is 'NA'\)/))
  add('three classes', [header, ...rows, 'P9,3.5,harbour,2'].join('\n'), userError(/binary target needs (exactly )?two classes/), { task: 'binary' })
  add('one class', [header, ...rows.map((r) => r.replace(/,[01]$/, ',0'))].join('\n'), userError(/binary target needs two classes, but every row has '0'/), { task: 'binary' })
  add('multiclass target with two classes', [header, ...rows].join('\n'), userError(/column 'late': a multiclass target needs at least three classes, found 2: /), { task: 'multiclass' })
  add('multiclass target of three text classes', [header, ...rows.map((r, i) => r.replace(/,[01]$/, `,${['depot', 'locker', 'doorstep'][i % 3]}`))].join('\n'), accepted(), { task: 'multiclass' })
  add('multiclass target cell empty', [header, ...rows.map((r, i) => r.replace(/,[01]$/, `,${i % 3}`)), 'P9,3.5,harbour,'].join('\n'), userError(/column 'late': the target is missing \(the cell is empty\)/), { task: 'multiclass' })
  add('no target column', [header.replace(',late', ',on_time'), ...rows].join('\n'), userError(/has no target column 'late'/))
  add('regression target text', [header, ...rows, 'P9,3.5,harbour,soon'].join('\n'), userError(/'soon' is not a number, but the target of a regression must be one/), { task: 'regression' })
  add('regression target 1e308', [header, ...rows, 'P9,3.5,harbour,1e308'].join('\n'), userError(/'1e308' is not a finite number within ±1e100/), { task: 'regression' })
  add('regression target -1e308', [header, ...rows, 'P9,3.5,harbour,-1e308'].join('\n'), userError(/'-1e308' is not a finite number within ±1e100/), { task: 'regression' })
  // Structure.
  add('empty file', '', userError(/data\/train\.csv is empty\./))
  add('only a BOM', '\uFEFF', userError(/is empty/))
  add('only blank lines', '\n\n  \n', userError(/is empty/))
  add('short row', [header, ...rows.slice(0, 4), 'P9,3.5', ...rows.slice(4)].join('\n'), userError(/line 6 \(the header is line 1\): the row has 2 fields, the header has 4\./))
  add('long row', [header, ...rows.slice(0, 4), 'P9,3.5,harbour,0,extra', ...rows.slice(4)].join('\n'), userError(/the row has 5 fields, the header has 4/))
  add('unclosed quote', [header, 'P9,"3.5,harbour,0', ...rows].join('\n'), userError(/data\/train\.csv, line \d+ \(the header is line 1\): /))
  add('quote inside a field', [header, 'P9,3"5,harbour,0', ...rows].join('\n'), userError(/data\/train\.csv, line \d+/))
  add('duplicate column names', ['parcel_id,distance_km,distance_km,late', ...rows].join('\n'), userError(/distance_km/))
  add('empty column name', ['parcel_id,,depot,late', ...rows].join('\n'), userError(/column 2|empty|name/))
  add('header only', header, userError(/row|empty/))
  add('NUL bytes only', '\u0000'.repeat(4096), userError(/data\/train\.csv/))
  add('binary garbage', Array.from({ length: 2048 }, (_, i) => String.fromCharCode((i * 7919) % 256)).join(''), userError(/data\/train\.csv/))
  add('semicolon separated', [header.replace(/,/g, ';'), ...rows.map((r) => r.replace(/,/g, ';'))].join('\n'), userError(/data\/train\.csv/))
  add('duplicate ids', [header, ...rows, rows[0]].join('\n'), accepted())
  add('CRLF and BOM', `\uFEFF${[header, ...rows].join('\r\n')}\r\n`, accepted((d) => assert((d as { rows: number }).rows === 30, '30 rows')))
  add('CR line ends', [header, ...rows].join('\r'), accepted((d) => assert((d as { rows: number }).rows === 30, '30 rows')))
  add('the id column declared twice as id', ['parcel_id,distance_km,depot,late', ...rows].join('\n'), accepted(), { roles: { parcel_id: 'id' } })
  add('ignore role for the target', [header, ...rows].join('\n'), userError(/late/), { roles: { parcel_id: 'id', late: 'ignore' } })
  // Hostile names and values: read as they are; the markdown escaper keeps them inert (checked in corpus.test.ts).
  const hostileNames = ['<img src=x onerror=alert(1)>', 'a|b', '"line\nbreak"', '\u001b[2Jclear', 'rtl\u202eoverride', 'x'.repeat(3000), '@channel', '#12', '[link](http://x.example)', '`code`', '<!-- comment', '&lt;amp']
  for (const name of hostileNames) {
    add(`hostile column name ${JSON.stringify(name).slice(0, 24)}`, [`parcel_id,${name},depot,late`, ...rows].join('\n'), accepted())
  }
  add('hostile category values', [header, ...rows.map((r, i) => (i === 0 ? r.replace('harbour', '"<script>x</script>"') : r))].join('\n'), accepted())
  add('token as a value', [header, ...rows.slice(0, 2), `P9,${corpusToken},harbour,0`, ...rows.slice(2)].join('\n'), userError(/is not a number/), numericRoles)
  return cases
}

// ---------------------------------------------------------------------------------------------
// YAML

function yamlCases(): CorpusCase[] {
  const cases: CorpusCase[] = []
  const add = (name: string, text: string, expect: Expected) => cases.push({ family: 'yaml', name, run: async () => parsePolicy(text, { source: 'plumbline.yml' }), expect })
  const base = smallPolicy()
  const replace = (from: string, to: string) => {
    if (!base.includes(from)) throw new Error(`corpus: the small policy has no '${from}'`)
    return base.replace(from, to)
  }
  const keyValue = [
    ['version: 1', ['version: 2', 'version: one', 'version:', 'version: [1]', 'version: {a: 1}']],
    ['task: binary', ['task: multi-class', 'task:', 'task: Binary', 'task: [binary]', 'task: 1']],
    ['target: late', ['target:', 'target: [late]', 'target: {a: b}']],
    ['seed: 7', ['seed: -1', 'seed: 1.5', 'seed: abc', 'seed: 99999999999999', 'seed:', 'seed: 0x10', 'seed: [7]']],
    ['  train: data/train.csv', ['  train:', '  train: [a, b]', '  train: {x: 1}']],
    ['  draws: 3', ['  draws: 0', '  draws: -3', '  draws: many', '  draws: 1000000000', '  draws: 2.5']],
    ['  refits: 3', ['  refits: 0', '  refits: -1', '  refits: lots', '  refits: 100000']],
    ['    learner: gradient-boosting', ['    learner: xgboost', '    learner:', '    learner: [gradient-boosting]']],
    ['    trees: 60', ['    trees: 0', '    trees: -1', '    trees: abc', '    trees: 1000000000000']],
    ['    max_depth: 3', ['    max_depth: 0', '    max_depth: 1000', '    max_depth: deep']],
    ['    parcel_id: id', ['    parcel_id: identifier', '    parcel_id:', '    parcel_id: [id]']],
  ] as const
  for (const [from, values] of keyValue) {
    for (const to of values) add(`${from.trim()} -> ${to.trim()}`, replace(from, to), userError(/^plumbline\.yml(:\d+:\d+)?: /))
  }
  add('typo in a top-level key', replace('importance:', 'improtance:'), userError(/unknown key 'improtance' at the top level .* Did you mean 'importance'\?/))
  add('typo in a nested key', replace('  draws: 3', '  drawz: 3'), userError(/unknown key 'drawz' in importance/))
  add('camelCase key', replace('    max_depth: 3', '    maxDepth: 3'), userError(/unknown key 'maxDepth'/))
  add('duplicate key', `${base}seed: 8\n`, userError(/key 'seed' appears twice at the top level/))
  add('tab indentation', base.replace('  train:', '\ttrain:'), userError(/not valid YAML|plumbline\.yml:\d+:\d+/))
  add('unknown tag python/object', `${base}prepare:\n  command: !!python/object:os.system x\n`, userError(/the YAML tag 'tag:yaml\.org,2002:python\/object:os\.system' is not allowed/))
  add('unknown local tag', replace('seed: 7', 'seed: !seed 7'), userError(/the YAML tag '!seed' is not allowed/))
  add('binary tag (a known tag: the text is read, and refused as a seed)', replace('seed: 7', 'seed: !!binary aGVsbG8='), userError(/seed must be a whole number/))
  add('version 1.0 reads as 1', replace('version: 1', 'version: 1.0'), accepted())
  add('seed 1e3 reads as 1000', replace('seed: 7', 'seed: 1e3'), accepted((c) => assert((c as { seed: number }).seed === 1000, 'seed 1000')))
  add('int tag', replace('seed: 7', 'seed: !!int 7'), userError(/the YAML tag 'tag:yaml\.org,2002:int' is not allowed/))
  add('str tag accepted', replace('seed: 7', 'seed: !!str 7'), accepted())
  add('self alias', `a: &a [*a]\n${base}`, userError(/plumbline\.yml/))
  add('undefined alias', replace('seed: 7', 'seed: *nothing'), userError(/plumbline\.yml/))
  const bomb = ['a: &a [x, x, x, x, x, x, x, x, x, x]']
  for (let i = 1; i <= 8; i++) bomb.push(`${String.fromCharCode(97 + i)}: &${String.fromCharCode(97 + i)} [${Array(10).fill(`*${String.fromCharCode(96 + i)}`).join(', ')}]`)
  add('alias bomb', `${bomb.join('\n')}\n`, userError(/the policy expands to more than 100000 values/))
  add('alias bomb after a valid policy', `${base}x: &x [1,1,1,1,1,1,1,1,1,1]\ny: &y [*x,*x,*x,*x,*x,*x,*x,*x,*x,*x]\nz: &z [*y,*y,*y,*y,*y,*y,*y,*y,*y,*y]\nw: &w [*z,*z,*z,*z,*z,*z,*z,*z,*z,*z]\nv: [*w,*w,*w,*w,*w,*w,*w,*w,*w,*w,*w,*w]\n`, userError(/the policy expands to more than 100000 values/))
  add('deep nesting', `${'['.repeat(200)}${']'.repeat(200)}\n`, userError(/plumbline\.yml/))
  add('deep mapping nesting', `${Array.from({ length: 100 }, (_, i) => `${'  '.repeat(i)}k${i}:`).join('\n')} 1\n`, userError(/plumbline\.yml/))
  add('top level list', '- version: 1\n- task: binary\n', userError(/the top level must be a mapping/))
  add('top level scalar', 'hello\n', userError(/the top level must be a mapping .*; got 'hello'\./))
  add('long top level scalar is cut', `${'A'.repeat(5000)}\n`, userError(/got 'A{40}…'\./))
  add('binary policy', Array.from({ length: 512 }, (_, i) => String.fromCharCode((i * 131) % 256)).join(''), userError(/plumbline\.yml/))
  add('environment-like text', `PATH=/usr/bin\u0000GITHUB_TOKEN=${corpusToken}\u0000HOME=/root\u0000`, userError(/plumbline\.yml/))
  add('empty', '', userError(/the file is empty/))
  add('comments only', '# nothing\n# here\n', userError(/the file is empty/))
  add('two documents', `${base}---\nversion: 1\n`, userError(/plumbline\.yml/))
  add('over a mebibyte', `# ${'x'.repeat(1024 * 1024)}\n${base}`, userError(/characters long; a policy is at most 1048576/))
  add('flow style accepted', base.replace(/importance:\n  draws: 3\n  refits: 3\n/, 'importance: {draws: 3, refits: 3}\n'), accepted())
  add('CRLF accepted', base.replace(/\n/g, '\r\n'), accepted())
  add('BOM accepted', `\uFEFF${base}`, accepted())
  add('unknown check', `${base}checks:\n  leak:\n    action: block\n`, userError(/unknown key 'leak' in checks/))
  add('check action word', `${base}checks:\n  leakage:\n    action: stop\n`, userError(/checks\.leakage\.action/))
  add('check action yes', `${base}checks:\n  leakage:\n    action: yes\n`, userError(/checks\.leakage\.action/))
  add('prepare without command', `${base}prepare:\n  timeout_seconds: 5\n`, userError(/prepare/))
  add('prepare timeout zero', `${base}prepare:\n  command: make\n  timeout_seconds: 0\n`, userError(/timeout_seconds/))
  add('evaluation_rows 1', smallPolicy({ extra: '  evaluation_rows: 1\n' }), userError(/importance\.evaluation_rows must be a whole number of at least 2; got '1'\./))
  add('key holding a token', `${base}${corpusToken}: 1\n`, userError(/unknown key/))
  add('key with escape sequence', `${base}"\\e[2Jx": 1\n`, userError(/unknown key '\\u001b\[2Jx'/))
  return cases
}

// ---------------------------------------------------------------------------------------------
// ONNX

function onnxCases(fixtures: string): CorpusCase[] {
  const cases: CorpusCase[] = []
  const read = (name: string) => new Uint8Array(readFileSync(join(fixtures, name)))
  const regressionFeatures = ['distance_km', 'stop_count', 'hour'].map((name) => ({ name, kind: 'numeric' as const }))
  const load = (bytes: Uint8Array, task: 'binary' | 'regression' | 'multiclass' = 'regression', features = regressionFeatures) => async () =>
    loadOnnxModel(bytes, { source: 'models/model.onnx', task, features, ...(task === 'multiclass' ? { classes: ['depot', 'locker', 'doorstep'] } : {}) })
  const add = (name: string, run: () => Promise<unknown>, expect: Expected) => cases.push({ family: 'onnx', name, run, expect })
  const notModel = userError(/ONNX model 'models\/model\.onnx'/)
  add('empty bytes', load(new Uint8Array(0)), notModel)
  add('one byte', load(new Uint8Array([8])), notModel)
  add('text file', load(new TextEncoder().encode('distance_km,late\n1,0\n')), notModel)
  add('Git LFS pointer', load(new TextEncoder().encode('version https://git-lfs.github.com/spec/v1\noid sha256:4d7a\nsize 1234\n')), notModel)
  add('zip header', load(new Uint8Array([0x50, 0x4b, 0x03, 0x04, ...new Array(60).fill(0)])), notModel)
  add('JSON', load(new TextEncoder().encode('{"graph": {}}')), notModel)
  const random = createRandom(99)
  add('random kilobyte', load(Uint8Array.from({ length: 1024 }, () => random.int(256))), notModel)
  add('committed truncated fixture', load(read('truncated.onnx')), notModel)
  const linear = read('linear-regressor.onnx')
  for (const fraction of [0.1, 0.3, 0.5, 0.7, 0.9, 0.99]) add(`linear model cut at ${fraction * 100}%`, load(linear.slice(0, Math.floor(linear.length * fraction))), notModel)
  for (let k = 0; k < 6; k++) {
    const flipped = linear.slice()
    const at = (k * 7919) % flipped.length
    flipped[at] ^= 0xff
    // Byte 188 lies inside a weight: the model stays valid, with another weight.
    add(`linear model with byte ${at} flipped`, load(flipped), at === 188 ? accepted() : userError(/ONNX model 'models\/model\.onnx'/))
  }
  add('classifier for a regression task', load(read('tree-classifier.onnx'), 'regression', ['distance_km', 'stop_count'].map((name) => ({ name, kind: 'numeric' as const }))), userError(/models\/model\.onnx/))
  add('regressor for a binary task', load(linear, 'binary'), userError(/models\/model\.onnx/))
  const classifierFeatures = ['distance_km', 'stop_count'].map((name) => ({ name, kind: 'numeric' as const }))
  add('two-class classifier for a three-class task', load(read('tree-classifier.onnx'), 'multiclass', classifierFeatures), userError(/models\/model\.onnx' output 'probabilities' has shape \[N, 2\]; the data has 3 classes/))
  add('ZipMap classifier for a three-class task', load(read('zipmap-classifier.onnx'), 'multiclass', classifierFeatures), userError(/models\/model\.onnx/))
  add('regressor for a three-class task', load(linear, 'multiclass'), userError(/models\/model\.onnx/))
  add('features the data lacks', load(linear, 'regression', [{ name: 'weight_kg', kind: 'numeric' }]), userError(/models\/model\.onnx/))
  add('the linear model as it is', load(linear), accepted())
  return cases
}

// ---------------------------------------------------------------------------------------------
// Event payloads

function eventCases(): CorpusCase[] {
  const cases: CorpusCase[] = []
  const sha = (c: string) => c.repeat(40)
  const pr = () => ({
    action: 'opened',
    number: 7,
    pull_request: { number: 7, base: { sha: sha('a'), repo: { full_name: 'np/late' } }, head: { sha: sha('b'), repo: { full_name: 'np/late' } } },
    repository: { full_name: 'np/late', id: 1 },
  })
  const add = (name: string, eventName: string, payload: unknown, expect: Expected) =>
    cases.push({ family: 'event', name, run: async () => parsePullRequestEvent(eventName, payload, 'np/late'), expect })
  const broken = userError(/pull_request/)
  const mutate = (change: (p: ReturnType<typeof pr>) => void) => {
    const payload = pr()
    change(payload)
    return payload
  }
  for (const [name, value] of [['a string', '7'], ['negative', -7], ['a fraction', 7.5], ['huge', 2 ** 60], ['null', null], ['an array', [7]], ['NaN text', 'NaN']] as const) {
    add(`pull_request.number is ${name}`, 'pull_request', mutate((p) => ((p.pull_request as Record<string, unknown>).number = value)), broken)
  }
  add('no pull_request', 'pull_request', { action: 'opened' }, broken)
  add('pull_request null', 'pull_request', mutate((p) => ((p as Record<string, unknown>).pull_request = null)), broken)
  add('pull_request a list', 'pull_request', mutate((p) => ((p as Record<string, unknown>).pull_request = [1])), broken)
  for (const [name, value] of [['missing', undefined], ['short', 'abc'], ['not hex', 'z'.repeat(40)], ['an option', '--upload-pack=x'], ['a number', 7], ['with a newline', `${sha('b')}\n`]] as const) {
    add(`head.sha ${name}`, 'pull_request', mutate((p) => ((p.pull_request.head as Record<string, unknown>).sha = value)), broken)
    add(`base.sha ${name}`, 'pull_request_target', mutate((p) => ((p.pull_request.base as Record<string, unknown>).sha = value)), broken)
  }
  add('payload is a string', 'pull_request', 'pull_request', broken)
  add('payload is null', 'pull_request', null, broken)
  add('payload is a list', 'pull_request', [pr()], broken)
  add('head repository missing means a fork', 'pull_request', mutate((p) => delete (p.pull_request.head as Record<string, unknown>).repo), accepted((e) => assert((e as { isHeadFromFork: boolean }).isHeadFromFork, 'fork')))
  add('head from another repository', 'pull_request_target', mutate((p) => (p.pull_request.head.repo.full_name = 'stranger/late')), accepted((e) => assert((e as { isHeadFromFork: boolean; isPrivileged: boolean }).isHeadFromFork && (e as { isPrivileged: boolean }).isPrivileged, 'privileged fork')))
  add('push with a zero before', 'push', { before: sha('0'), after: sha('c') }, accepted((e) => assert((e as { baseSha: unknown }).baseSha === null, 'no base')))
  add('push with an option as after', 'push', { before: sha('a'), after: '--output=x' }, accepted((e) => assert((e as { headSha: unknown }).headSha === null, 'no head')))
  add('workflow_run without id', 'workflow_run', { workflow_run: { head_sha: sha('d') } }, userError(/workflow_run/))
  add('workflow_run with a bad sha', 'workflow_run', { workflow_run: { id: 3, head_sha: 'nope' } }, userError(/workflow_run/))
  add('workflow_run pull_requests not a list names no pull request', 'workflow_run', { workflow_run: { id: 3, head_sha: sha('d'), pull_requests: 'x' } }, accepted((e) => assert((e as { pullRequest: unknown }).pullRequest === null, 'no pull request')))
  add('unknown event', 'issue_comment', { comment: { body: '/gate' } }, accepted((e) => assert((e as { pullRequest: unknown }).pullRequest === null, 'no pull request')))
  add('event name with a newline', 'pull_request\nx', pr(), accepted((e) => assert((e as { pullRequest: unknown }).pullRequest === null, 'unknown event')))
  return cases
}

// ---------------------------------------------------------------------------------------------
// git refs

function gitRefCases(root: string, marker: string): CorpusCase[] {
  const cases: CorpusCase[] = []
  const noCommit = userError(/^--base '.*' does not name a commit in /s)
  const add = (ref: string, expect: Expected = noCommit) => cases.push({ family: 'git-ref', name: `--base ${JSON.stringify(ref).slice(0, 40)}`, run: () => resolveCommit(root, ref, '--base'), expect })
  for (const ref of ['-h', '--output=' + marker, '--upload-pack=touch ' + marker, `main;touch ${marker}`, `$(touch ${marker})`, `\`touch ${marker}\``, 'main..pr', 'main...pr', 'HEAD~9999', 'refs/heads/../../x', '', ' ', 'a'.repeat(300), 'no-such-branch', 'main^{tree}', 'main:README.md', '\u202emain', 'mäin', '0'.repeat(40), 'f'.repeat(40), '-', '--', '--end-of-options', 'main\nmain', '*', '~', '--all', '--not main', ':/base', ':/marker']) add(ref)
  const sha = (text: unknown) => assert(typeof text === 'string' && /^[0-9a-f]{40}$/.test(text), 'a commit')
  // @{-1}: the branch checked out before (main); a commit-message search (:/text) never resolves, as
  // resolveCommit appends ^{commit} to the text searched for.
  for (const ref of ['main', 'pr', 'HEAD', 'main~0', 'HEAD^', '@{-1}']) add(ref, accepted(sha))
  // The action's ref inputs: refused before git sees them.
  const input = (name: string, value: string, expect: Expected) =>
    cases.push({
      family: 'git-ref',
      name: `input '${name}' ${JSON.stringify(value).slice(0, 30)}`,
      run: async () => readInputs((n) => (n === name ? value : n === 'mode' ? 'check' : '')),
      expect,
    })
  for (const value of ['-rf', '--output=x', 'main branch', 'main\tx', 'a\u0000b', '-']) input('base', value, userError(/^Input 'base' must be a commit SHA or a git ref/))
  for (const value of ['--upload-pack=x', 'two words']) input('head', value, userError(/^Input 'head' must be a commit SHA or a git ref/))
  return cases
}

// ---------------------------------------------------------------------------------------------
// The action's plan, shard and merge inputs: each refused by name before anything runs

function actionInputCases(): CorpusCase[] {
  const cases: CorpusCase[] = []
  const add = (name: string, inputs: Record<string, string>, expect: Expected) =>
    cases.push({ family: 'action-input', name, run: async () => readInputs((n) => inputs[n] ?? ''), expect })
  const count = ['0', '-1', '1e3', '2.0', '0x10', '\u0661', ' 2 2', '99999999999999999999', 'NaN', 'Infinity', '1001', 'two', '${{ matrix.shard }}']
  for (const value of count) add(`plan shards ${JSON.stringify(value)}`, { mode: 'plan', shards: value }, userError(/^Input 'shards' must be a whole number from 1 to 1000; got '/))
  for (const value of [...count.filter((v) => v !== '1001'), '5']) {
    add(`shard index ${JSON.stringify(value)} of 4`, { mode: 'shard', shards: '4', shard: value }, userError(/^Input 'shard' must be a whole number from 1 to 4; got '/))
  }
  add('plan without shards', { mode: 'plan' }, userError(/^Input 'shards' is required when 'mode' is plan/))
  add('shard without an index', { mode: 'shard', shards: '3' }, userError(/^Input 'shard' is required when 'mode' is shard/))
  add('merge without partials', { mode: 'merge', partials: ' \n \n' }, userError(/^Input 'partials' is required when 'mode' is merge/))
  add('partials with a NUL', { mode: 'merge', partials: 'a\u0000b' }, userError(/^Input 'partials' must be a single path/))
  add('after with a NUL', { mode: 'shard', shards: '2', shard: '1', after: 'refits\nx\u0000' }, userError(/^Input 'after' must be a single path/))
  add('partial-dir of two lines', { mode: 'shard', shards: '2', shard: '1', 'partial-dir': 'a\nb' }, userError(/^Input 'partial-dir' must be a single path/))
  add('cache in plan mode', { mode: 'plan', shards: '2', cache: 'true' }, userError(/^Input 'cache' is read only when 'mode' is check or shard/))
  add('cache yes', { cache: 'yes' }, userError(/^Input 'cache' must be true or false; got 'yes'\./))
  add('shard index in check mode', { shard: '1' }, userError(/^Input 'shard' is read only when 'mode' is shard; this step's mode is check\./))
  add('shard 4 of 4', { mode: 'shard', shards: '4', shard: '4' }, accepted((r) => assert((r as { shard: number }).shard === 4, 'shard 4')))
  return cases
}

// ---------------------------------------------------------------------------------------------
// Commands

function commandCases(cwd: string): CorpusCase[] {
  const cases: CorpusCase[] = []
  const add = (name: string, command: string, expect: Expected, timeoutSeconds = 5) =>
    cases.push({ family: 'command', name, run: () => runPrepare({ command, cwd, timeoutSeconds, side: 'head' }), expect })
  add('exit 1', 'exit 1', userError(/^prepare on the head side exited with code 1: exit 1/))
  add('exit 255', 'exit 255', userError(/exited with code 255/))
  add('SIGKILL', 'kill -KILL $$', userError(/was killed by signal SIGKILL/))
  add('SIGTERM', 'kill -TERM $$', userError(/was killed by signal SIGTERM/))
  add('SIGSEGV', 'kill -SEGV $$', userError(/was killed by signal SIGSEGV/))
  add('prints the token variables', 'echo "$GITHUB_TOKEN|$INPUT_TOKEN|$ACTIONS_RUNTIME_TOKEN|$GH_TOKEN"; exit 1', userError(/\n\|\|\|$/))
  add('prints the environment', 'env; exit 1', userError(/PLUMBLINE_SIDE=head/))
  add('reads /proc/self/environ', 'tr "\\0" "\\n" < /proc/self/environ; exit 1', userError(/PLUMBLINE_SIDE=head/))
  add('reads the parent environment', 'tr "\\0" "\\n" < /proc/$PPID/environ 2>/dev/null; exit 1', userError(/exited with code 1/))
  add('terminal escapes', "printf '\\033]0;owned\\007\\033[2J\\033[31mRED'; exit 1", userError(/\nRED$/))
  add('carriage return overwrite', "printf 'plumbline: pass\\rreal'; exit 1", userError(/plumbline: pass\uFFFDreal/))
  add('lots of output', 'yes plumbline | head -c 3000000; exit 1', userError(/(plumbline\n){30}/))
  add('one huge line', 'head -c 2000000 /dev/zero | tr "\\0" x; exit 1', userError(/exited with code 1/))
  add('setsid grandchild holds the output', 'setsid sleep 30 & exit 1', userError(/exited with code 1/))
  add('runs past its timeout', 'sleep 30', userError(/timed out after 1 s/), 1)
  add('ignores SIGTERM past its timeout', 'trap "" TERM; sleep 30', userError(/timed out after 1 s/), 1)
  add('not a command', 'no-such-command-for-plumbline', userError(/exited with code 127/))
  add('closes its output', 'exec 1>&- 2>&-; exit 3', userError(/exited with code 3:[^]*\(no output\)/))
  add('shell metacharacters as text', `echo '$(touch x); \`id\`'; exit 4`, userError(/exited with code 4/))
  add('true', 'true', accepted())
  add('prints and succeeds', 'echo building features', accepted())
  add('setsid grandchild on success', 'setsid sleep 30 & echo ok', accepted())
  return cases
}

// ---------------------------------------------------------------------------------------------
// Paths

function pathCases(root: string, outside: string): CorpusCase[] {
  const cases: CorpusCase[] = []
  mkdirSync(join(root, 'data', 'deep'), { recursive: true })
  writeFileSync(join(root, 'data', 'train.csv'), [header, ...goodRows()].join('\n'))
  writeFileSync(join(outside, 'secret.csv'), `${outsideSentinel},late\n1,0\n2,1\n`)
  symlinkSync(join(outside, 'secret.csv'), join(root, 'data', 'out-link.csv'))
  symlinkSync(outside, join(root, 'data', 'out-folder'))
  symlinkSync('/dev/zero', join(root, 'data', 'zero.csv'))
  symlinkSync('/dev/urandom', join(root, 'data', 'random.csv'))
  symlinkSync('/proc/self/environ', join(root, 'data', 'environ.csv'))
  symlinkSync('/etc/passwd', join(root, 'data', 'passwd.csv'))
  symlinkSync('train.csv', join(root, 'data', 'in-link.csv'))
  symlinkSync('loop-b.csv', join(root, 'data', 'loop-a.csv'))
  symlinkSync('loop-a.csv', join(root, 'data', 'loop-b.csv'))
  symlinkSync(join(outside, 'missing.csv'), join(root, 'data', 'dangling.csv'))
  execFileSync('mkfifo', [join(root, 'data', 'fifo.csv')])
  const read = (path: string) => async () =>
    readDataset(path, { key: 'data.train', cwd: root, rootName: 'the head checkout', source: `head: ${path}`, target: 'late', roles: { parcel_id: 'id' } })
  const add = (path: string, expect: Expected) => cases.push({ family: 'path', name: `data.train ${JSON.stringify(path).slice(0, 50)}`, run: read(path), expect })
  const lies = userError(/^data\.train '.*' lies outside the head checkout; plumbline reads and writes only inside it\.$/s)
  const points = userError(/^data\.train '.*' points \(through a symlink(ed folder)?\) outside the head checkout/)
  for (const path of ['../secret.csv', '../../etc/passwd', '/etc/passwd', join(outside, 'secret.csv'), 'data/../../secret.csv', '/proc/self/environ', '/dev/zero', '//etc/passwd', 'data/deep/../../../x.csv']) add(path, lies)
  for (const path of ['data/out-link.csv', 'data/out-folder/secret.csv', 'data/zero.csv', 'data/random.csv', 'data/environ.csv', 'data/passwd.csv', 'data/out-folder/missing.csv']) add(path, points)
  add('data/fifo.csv', userError(/data\.train 'data\/fifo\.csv' is a FIFO \(named pipe\), not a regular file/))
  add('data', userError(/Cannot read the data file head: data: it is a directory in that side's commit\./))
  add('data/', userError(/it is a directory/))
  add('.', userError(/it is a directory/))
  add('data/missing.csv', userError(/Cannot read the data file head: data\/missing\.csv: there is no such file in that side's commit\./))
  add('data/dangling.csv', userError(/no such file|outside the head checkout/))
  add('data/loop-a.csv', userError(/data\.train 'data\/loop-a\.csv' is a symlink loop\./))
  add(`data/${'n'.repeat(300)}.csv`, userError(/data\.train|Cannot read the data file/))
  add('data/train.csv', accepted((d) => assert((d as { rows: number }).rows === 30, '30 rows')))
  add('data/./train.csv', accepted())
  add('data//train.csv', accepted())
  add('data/deep/../train.csv', accepted())
  add('data/in-link.csv', accepted())
  // A sparse 300 MiB data file (no disk used): refused by its size before a byte is read.
  writeFileSync(join(root, 'data', 'huge.csv'), '')
  truncateSync(join(root, 'data', 'huge.csv'), 300 * 1024 * 1024)
  add('data/huge.csv', userError(/^data\.train 'data\/huge\.csv' is larger than plumbline reads for a data file \(256 MiB\)\.$/))
  // The byte cap: a policy file read with the policy limit.
  writeFileSync(join(root, 'big.yml'), 'x'.repeat(2 * 1024 * 1024))
  cases.push({
    family: 'path',
    name: 'policy larger than its limit',
    run: () => readConfinedFile({ key: 'The policy file', path: 'big.yml', root, rootName: 'the head checkout' }, { maxBytes: 1024 * 1024, what: 'policy', missing: () => new UserError('missing') }),
    expect: userError(/^The policy file 'big\.yml' is larger than plumbline reads for a policy \(1 MiB\)\.$/),
  })
  return cases
}

// ---------------------------------------------------------------------------------------------
// Report content (publish mode reads a report another job wrote)

function reportCases(): CorpusCase[] {
  const cases: CorpusCase[] = []
  const parse = (json: unknown) => async () => parseGateReport(json, 'report.json')
  const add = (name: string, json: unknown, expect: Expected) => cases.push({ family: 'report', name, run: parse(json), expect })
  const mutate = (change: (r: Record<string, unknown>) => void) => {
    const report = structuredClone(courierReport()) as unknown as Record<string, unknown>
    change(report)
    return report
  }
  const schema = userError(/^report\.json/)
  add('null', null, schema)
  add('a list', [courierReport()], schema)
  add('a string', 'pass', schema)
  add('schema version 2', mutate((r) => (r.schemaVersion = 2)), userError(/schema version 2/))
  add('schema version as text', mutate((r) => (r.schemaVersion = '1')), schema)
  add('verdict maybe', mutate((r) => (r.verdict = 'maybe')), schema)
  add('verdict missing', mutate((r) => delete r.verdict), schema)
  add('extra top-level key', mutate((r) => (r.injected = '<script>')), schema)
  add('__proto__ key', JSON.parse(JSON.stringify(courierReport()).replace('{', '{"__proto__":{"polluted":1},')), schema)
  add('findings not a list', mutate((r) => (r.findings = {})), schema)
  add('finding severity fatal', mutate((r) => ((r.findings as Record<string, unknown>[])[0].severity = 'fatal')), schema)
  add('finding kind unknown', mutate((r) => ((r.findings as Record<string, unknown>[])[0].kind = 'pwn')), schema)
  add('evidence nested object', mutate((r) => ((r.findings as Record<string, unknown>[])[0].evidence = { a: { b: 1 } })), schema)
  add('evidence a huge number of keys', mutate((r) => ((r.findings as Record<string, unknown>[])[0].evidence = Object.fromEntries(Array.from({ length: 5000 }, (_, i) => [`k${i}`, i])))), schema)
  add('a number as text', mutate((r) => ((r.settings as Record<string, unknown>).draws = '3')), schema)
  add('negative count', mutate((r) => ((r.settings as Record<string, unknown>).draws = -3)), schema)
  add('headline of 200 000 characters', mutate((r) => (r.headline = 'x'.repeat(200_000))), schema)
  add('100 000 findings', mutate((r) => (r.findings = Array.from({ length: 100_000 }, () => (r.findings as unknown[])[0]))), accepted())
  add('caution missing', mutate((r) => delete r.caution), schema)
  add('tool name changed', mutate((r) => ((r.tool as Record<string, unknown>).name = 'other')), schema)
  // Accepted, then rendered: hostile text must stay inert in the markdown.
  const inert = (text: string) => (r: unknown) => {
    const markdown = renderMarkdown(r as never)
    assert(!markdown.includes(text), `the markdown holds ${JSON.stringify(text)} unescaped`)
    assert(!markdown.includes('\u001b'), 'no escape character in the markdown')
  }
  const hostile = ['<script>alert(1)</script>', '<img src=x onerror=alert(1)>', '[click](javascript:alert(1))', '@everyone', '#1', '\u001b[2J', '| a | b |', '<!-- hide -->', '```\nfence', '<a href="x">y</a>']
  for (const text of hostile) {
    add(`hostile headline ${JSON.stringify(text).slice(0, 24)}`, mutate((r) => (r.headline = `Blocked: ${text}`)), accepted(inert(text)))
    add(`hostile finding title ${JSON.stringify(text).slice(0, 24)}`, mutate((r) => ((r.findings as Record<string, unknown>[])[0].title = text)), accepted(inert(text)))
  }
  add('the courier report as written', courierReport(), accepted())
  return cases
}

export interface CorpusPlaces {
  /** The folder with test/fixtures/onnx. */
  readonly fixtures: string
  /** A git repository with main and pr (make-repository.ts). */
  readonly repository: string
  /** A file name whose creation would mean a ref ran a command. */
  readonly marker: string
  /** An empty checkout folder for the path cases, and a folder outside it. */
  readonly checkout: string
  readonly outside: string
  /** Where commands run. */
  readonly commandFolder: string
}

export function buildCorpus(places: CorpusPlaces): CorpusCase[] {
  return [
    ...csvCases(),
    ...yamlCases(),
    ...onnxCases(places.fixtures),
    ...eventCases(),
    ...gitRefCases(places.repository, places.marker),
    ...commandCases(places.commandFolder),
    ...pathCases(places.checkout, places.outside),
    ...reportCases(),
    ...actionInputCases(),
  ]
}
