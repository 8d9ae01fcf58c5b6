import { readFileSync } from 'node:fs'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { parseCsv, schemaOf, type ParseCsvOptions } from '../../../src/core/data/parse-csv.ts'
import { userErrorText } from './user-error-text.ts'
import { breastCancerCsv, missingReference } from '../../helpers/reference-packages.ts'

// Small invented parcel-courier files (demo scenario); every expected value below is worked by hand.
const TRAIN = [
  'parcel_id,depot,distance_km,stops,late',
  'P1,north,12.5,3,yes',
  'P2,south,NA,5,no',
  'P3,east,3,,yes',
  'P4,north,7.25,2,no',
].join('\n')

const options: ParseCsvOptions = { source: 'data/train.csv', target: 'late', roles: { parcel_id: 'id' } }

describe('parseCsv(text, options)', () => {
  it('returns one Float64Array per feature, ids and a 0/1 target', () => {
    const data = parseCsv(TRAIN, options)
    expect(data.source).toBe('data/train.csv')
    expect(data.rows).toBe(4)
    expect(data.features).toEqual([
      { name: 'depot', kind: 'categorical', categories: ['east', 'north', 'south'] },
      { name: 'distance_km', kind: 'numeric' },
      { name: 'stops', kind: 'numeric' },
    ])
    expect(Array.from(data.columns[0])).toEqual([1, 2, 0, 1])
    expect(Array.from(data.columns[1])).toEqual([12.5, NaN, 3, 7.25])
    expect(Array.from(data.columns[2])).toEqual([3, 5, NaN, 2])
    expect(data.missing).toEqual([0, 1, 1])
    expect(data.ids).toEqual({ name: 'parcel_id', values: ['P1', 'P2', 'P3', 'P4'] })
    expect(data.target?.name).toBe('late')
    expect(Array.from(data.target!.values)).toEqual([1, 0, 1, 0])
    expect(data.target?.classes).toEqual(['no', 'yes'])
    expect(data.unseenCategories).toBeUndefined()
    expect(data.extraColumns).toBeUndefined()
  })

  it('treats trimmed empty, NA, NaN and null cells in any case as missing', () => {
    const data = parseCsv('x,c,y\n1,a,0\n na ,NULL,1\nNaN, ,0\n nan,Null,1\nnull,b,0\n', { source: 'm.csv', target: 'y' })
    expect(Array.from(data.columns[0])).toEqual([1, NaN, NaN, NaN, NaN])
    expect(Array.from(data.columns[1])).toEqual([0, NaN, NaN, NaN, 1])
    expect(data.missing).toEqual([4, 3])
  })

  it('infers numeric only when every non-missing cell is a decimal number', () => {
    const text = ['a,b,c,d,e,y', '1e3,-2.5,"1,5",12abc,0x1F,0', '.5,+4,2,3,4,1', '5.,1E-2,3,4,5,0'].join('\n')
    const data = parseCsv(text, { source: 'n.csv', target: 'y' })
    expect(data.features.map((f) => f.kind)).toEqual(['numeric', 'numeric', 'categorical', 'categorical', 'categorical'])
    expect(Array.from(data.columns[0])).toEqual([1000, 0.5, 5])
    expect(Array.from(data.columns[1])).toEqual([-2.5, 4, 0.01])
    expect(data.features[2].categories).toEqual(['1,5', '2', '3'])
  })

  it('lets declared roles override inference, and drops ignored columns', () => {
    const text = 'zone,note,km,y\n10,a,1,0\n9,b,2,1\n10,c,3,0\n'
    const data = parseCsv(text, { source: 'r.csv', target: 'y', roles: { zone: 'categorical', note: 'ignore' } })
    // Dictionaries sort by UTF-16 code units, so '10' comes before '9'.
    expect(data.features).toEqual([
      { name: 'zone', kind: 'categorical', categories: ['10', '9'] },
      { name: 'km', kind: 'numeric' },
    ])
    expect(Array.from(data.columns[0])).toEqual([0, 1, 0])
  })

  it('takes the target from a role when no target option is given', () => {
    const data = parseCsv('km,y\n1,0\n2,1\n', { source: 'r.csv', roles: { y: 'target' } })
    expect(data.target?.name).toBe('y')
    expect(data.features.map((f) => f.name)).toEqual(['km'])
  })

  it('maps 0/1, false/true and no/yes with the second as the positive class, in any case', () => {
    const target = (labels: string) => {
      const [a, b] = labels.split(',')
      return parseCsv(`x,y\n1,${a}\n2,${b}\n3,${a}\n`, { source: 't.csv', target: 'y' }).target!
    }
    expect(target('1,0').classes).toEqual(['0', '1'])
    expect(Array.from(target('1,0').values)).toEqual([1, 0, 1])
    expect(target('True,False').classes).toEqual(['False', 'True'])
    expect(Array.from(target('True,False').values)).toEqual([1, 0, 1])
    expect(target('no,YES').classes).toEqual(['no', 'YES'])
    expect(Array.from(target('no,YES').values)).toEqual([0, 1, 0])
  })

  it('makes the larger of any other pair positive: numerically for numbers, else in code-unit order', () => {
    const target = (a: string, b: string) => parseCsv(`x,y\n1,${a}\n2,${b}\n`, { source: 't.csv', target: 'y' }).target!
    expect(target('late', 'on-time').classes).toEqual(['late', 'on-time'])
    expect(target('on-time', 'late').classes).toEqual(['late', 'on-time'])
    expect(Array.from(target('on-time', 'late').values)).toEqual([1, 0])
    expect(target('10', '2').classes).toEqual(['2', '10'])
    expect(target('1', '-1').classes).toEqual(['-1', '1'])
  })

  it('reads a numeric target with more than two values as regression, or as the task says', () => {
    const text = 'x,minutes_late\n1,12.5\n2,0\n3,-3\n'
    const data = parseCsv(text, { source: 'r.csv', target: 'minutes_late' })
    expect(Array.from(data.target!.values)).toEqual([12.5, 0, -3])
    expect(data.target?.classes).toBeUndefined()
    const twoValues = parseCsv('x,y\n1,0\n2,1\n', { source: 'r.csv', target: 'y', task: 'regression' })
    expect(twoValues.target?.classes).toBeUndefined()
    expect(Array.from(twoValues.target!.values)).toEqual([0, 1])
  })

  it('reads a UTF-8 BOM, CRLF line ends, quoted commas, quotes and line breaks, and a trailing newline', () => {
    // Quoting as in RFC 4180 section 2, rules 5 to 7.
    const text = '\uFEFFnote,km,y\r\n"left at ""back door"", gate 2",1.5,0\r\n"two\r\nlines",2,1\r\n'
    const data = parseCsv(text, { source: 'q.csv', target: 'y' })
    expect(data.features[0]).toEqual({ name: 'note', kind: 'categorical', categories: ['left at "back door", gate 2', 'two\r\nlines'] })
    expect(data.rows).toBe(2)
    expect(Array.from(data.columns[1])).toEqual([1.5, 2])
  })

  it('skips blank lines, including several at the end', () => {
    const data = parseCsv('x,y\n1,0\n\n2,1\n\n\n', { source: 'b.csv', target: 'y' })
    expect(data.rows).toBe(2)
  })

  it('reads data without a target when requireTarget is false', () => {
    const data = parseCsv('x,c\n1,a\n', { source: 'ref.csv', target: 'late', requireTarget: false })
    expect(data.target).toBeUndefined()
    expect(data.features.map((f) => f.name)).toEqual(['x', 'c'])
  })

  it('gives the same columns up to the row permutation whatever the row order (property)', () => {
    const row = fc.record({
      depot: fc.constantFrom('north', 'south', 'east', 'NA', ''),
      km: fc.oneof(fc.integer({ min: -50, max: 50 }).map(String), fc.constant('NA')),
      late: fc.constantFrom('yes', 'no'),
    })
    fc.assert(
      fc.property(fc.array(row, { minLength: 2, maxLength: 30 }), fc.infiniteStream(fc.nat()), (rows, draws) => {
        const present = new Set(rows.map((r) => r.late))
        fc.pre(present.size === 2)
        // A permutation from the stream (Fisher-Yates driven by fast-check's draws).
        const order = rows.map((_, i) => i)
        const it = draws[Symbol.iterator]()
        for (let i = order.length - 1; i > 0; i--) {
          const j = it.next().value % (i + 1)
          ;[order[i], order[j]] = [order[j], order[i]]
        }
        const csv = (list: typeof rows) => ['depot,km,late', ...list.map((r) => `${r.depot},${r.km},${r.late}`)].join('\n')
        const a = parseCsv(csv(rows), { source: 'a.csv', target: 'late' })
        const b = parseCsv(csv(order.map((i) => rows[i])), { source: 'b.csv', target: 'late' })
        expect(b.features).toEqual(a.features)
        expect(b.missing).toEqual(a.missing)
        expect(b.target?.classes).toEqual(a.target?.classes)
        for (let j = 0; j < a.columns.length; j++) {
          expect(Array.from(b.columns[j])).toEqual(order.map((i) => a.columns[j][i]))
        }
        expect(Array.from(b.target!.values)).toEqual(order.map((i) => a.target!.values[i]))
      }),
      { seed: 20240611, numRuns: 200 },
    )
  })
})

describe('parseCsv(text, {schema}) with schemaOf(training data)', () => {
  const schema = schemaOf(parseCsv(TRAIN, options))

  it('records the features, id column, task and classes', () => {
    expect(schema).toEqual({
      source: 'data/train.csv',
      features: [
        { name: 'depot', kind: 'categorical', categories: ['east', 'north', 'south'] },
        { name: 'distance_km', kind: 'numeric' },
        { name: 'stops', kind: 'numeric' },
      ],
      idColumn: 'parcel_id',
      target: { name: 'late', task: 'binary', classes: ['no', 'yes'] },
    })
  })

  it('codes categories in the training dictionary, counts unseen ones, and lists extra columns', () => {
    const holdout = 'late,weather,stops,depot,distance_km,parcel_id\nyes,rain,1,west,4,H1\nyes,dry,2,south,5,H2\nyes,dry,3,west,6,H3\n'
    const data = parseCsv(holdout, { source: 'data/holdout.csv', schema })
    expect(data.features).toEqual(schema.features)
    expect(Array.from(data.columns[0])).toEqual([NaN, 2, NaN])
    expect(Array.from(data.columns[1])).toEqual([4, 5, 6])
    expect(data.missing).toEqual([0, 0, 0])
    expect(data.unseenCategories).toEqual({ depot: 2 })
    expect(data.extraColumns).toEqual(['weather'])
    // One class only is fine here: the mapping comes from the training file.
    expect(Array.from(data.target!.values)).toEqual([1, 1, 1])
    expect(data.target?.classes).toEqual(['no', 'yes'])
    expect(data.ids?.values).toEqual(['H1', 'H2', 'H3'])
  })

  it('keeps columns with the role ignore out of extraColumns', () => {
    const text = 'parcel_id,depot,distance_km,stops,late,note\nH1,north,1,1,no,x\n'
    const data = parseCsv(text, { source: 'h.csv', schema, roles: { note: 'ignore' } })
    expect(data.extraColumns).toEqual([])
    expect(data.unseenCategories).toEqual({})
  })

  it('reads reference data without the target when requireTarget is false', () => {
    const data = parseCsv('parcel_id,depot,distance_km,stops\nR1,east,1,1\n', { source: 'ref.csv', schema, requireTarget: false })
    expect(data.target).toBeUndefined()
    expect(Array.from(data.columns[0])).toEqual([0])
  })

  it('refuses a file that lacks columns of the schema', () => {
    expect(userErrorText(() => parseCsv('parcel_id,depot,late\nH1,north,no\n', { source: 'h.csv', schema }))).toBe(
      "h.csv lacks the columns 'distance_km', 'stops' that data/train.csv has. | Add them: a file read alongside data/train.csv needs its feature and id columns.",
    )
  })

  it('refuses a target label that the training file does not have', () => {
    const text = 'parcel_id,depot,distance_km,stops,late\nH1,north,1,1,no\nH2,north,1,1,maybe\n'
    expect(userErrorText(() => parseCsv(text, { source: 'h.csv', schema }))).toBe(
      "h.csv, line 3 (the header is line 1), column 'late': 'maybe' is not one of the target's classes in data/train.csv ('no', 'yes'). | Use the same two class labels as data/train.csv.",
    )
  })

  it('refuses text in a column that is numeric in the training file', () => {
    const text = 'parcel_id,depot,distance_km,stops,late\nH1,north,far,1,no\n'
    expect(userErrorText(() => parseCsv(text, { source: 'h.csv', schema }))).toBe(
      "h.csv, line 2 (the header is line 1), column 'distance_km': 'far' is not a number, but the column is numeric in data/train.csv. | Correct the value, or write NA or leave the cell empty if it is missing.",
    )
  })

  it('refuses a file without the target column by default', () => {
    expect(userErrorText(() => parseCsv('parcel_id,depot,distance_km,stops\nR1,east,1,1\n', { source: 'ref.csv', schema }))).toBe(
      "ref.csv has no target column 'late'. Its columns are 'parcel_id', 'depot', 'distance_km', 'stops'. | Add the column 'late' to the file, or name one of its columns as the target.",
    )
  })
})

describe('parseCsv(text, options) refuses, word for word', () => {
  const read = (text: string, extra: Partial<ParseCsvOptions> = {}) => userErrorText(() => parseCsv(text, { source: 'f.csv', target: 'late', ...extra }))

  it('an empty file', () => {
    expect(read('')).toBe('f.csv is empty. | Write the column names on the first line and one row per example below it.')
    expect(read('\uFEFF\r\n\r\n')).toBe('f.csv is empty. | Write the column names on the first line and one row per example below it.')
  })

  it('a header with no data rows', () => {
    expect(read('km,late\n')).toBe('f.csv has a header line but no data rows. | Add data rows below the header, or check that the path names the right file.')
  })

  it('a blank first line', () => {
    expect(read('\nkm,late\n1,0\n')).toBe('f.csv starts with a blank line. | Put the column names on the first line.')
  })

  it('a ragged row, with its line counted after a quoted line break', () => {
    expect(read('note,late\n"a\nb",0\nc,1,2\n')).toBe(
      'f.csv, line 4 (the header is line 1): the row has 3 fields, the header has 2. | Give every row one field per header column; enclose a field that holds a comma in double quotes.',
    )
    expect(read('km,late\r\n1,0\r\n\r\n2\r\n')).toBe(
      'f.csv, line 4 (the header is line 1): the row has 1 field, the header has 2. | Give every row one field per header column; enclose a field that holds a comma in double quotes.',
    )
  })

  it('duplicate and empty header names', () => {
    expect(read('km,late,km\n1,0,2\n')).toBe("f.csv, line 1: the header names two columns 'km' (columns 1 and 3). | Give every column its own name.")
    expect(read('km, ,late\n1,2,0\n')).toBe('f.csv, line 1: column 2 of the header has no name. | Name every column on the first line, or delete the unnamed column.')
  })

  it('a missing target column, or no target named', () => {
    expect(read('km,stops\n1,2\n')).toBe(
      "f.csv has no target column 'late'. Its columns are 'km', 'stops'. | Add the column 'late' to the file, or name one of its columns as the target.",
    )
    expect(userErrorText(() => parseCsv('km,stops\n1,2\n', { source: 'f.csv' }))).toBe(
      'f.csv: no target column was named. | Name the column that holds the outcome to predict as the target.',
    )
  })

  it('text in a declared numeric column', () => {
    expect(read('km,late\n1,0\n12abc,1\n', { roles: { km: 'numeric' } })).toBe(
      "f.csv, line 3 (the header is line 1), column 'km': '12abc' is not a number, but the column is declared numeric. | Correct the value, or write NA or leave the cell empty if it is missing.",
    )
  })

  it('text in a regression target', () => {
    expect(read('km,late\n1,3\n2,soon\n', { task: 'regression' })).toBe(
      "f.csv, line 3 (the header is line 1), column 'late': 'soon' is not a number, but the target of a regression must be one. | Correct the value, or write NA or leave the cell empty if it is missing.",
    )
  })

  it('a binary target with one class or more than two', () => {
    expect(read('km,late\n1,yes\n2,yes\n')).toBe(
      "f.csv, column 'late': a binary target needs two classes, but every row has 'yes'. | Check that the file holds rows of both outcomes and that the right column is the target.",
    )
    expect(read('km,late\n1,a\n2,b\n3,c\n4,d\n5,e\n6,f\n7,g\n', { task: 'binary' })).toBe(
      "f.csv, column 'late': a binary target needs exactly two classes, found 7: 'a', 'b', 'c', 'd', 'e' and 2 more. | Write the target with two values, or choose the regression task if it is a number.",
    )
  })

  it('a missing target value', () => {
    expect(read('km,late\n1,yes\n2,\n')).toBe(
      "f.csv, line 3 (the header is line 1), column 'late': the target is missing (the cell is empty). | Fill in the target or delete the row: a row without a target cannot be scored.",
    )
    expect(read('km,late\n1,yes\n2,no\n3,NaN\n')).toBe(
      "f.csv, line 4 (the header is line 1), column 'late': the target is missing (the cell is 'NaN'). | Fill in the target or delete the row: a row without a target cannot be scored.",
    )
  })

  it('CSV syntax errors, at the line where the row starts', () => {
    const fix = 'Enclose a field that holds a comma, a quote or a line break in double quotes, and write a quote inside it as two ("").'
    expect(read('km,late\r\n1,0\r\n\r\n2,"1\r\n\r\n')).toBe(`f.csv, line 4 (the header is line 1): a quoted field that starts in this row is never closed. | ${fix}`)
    expect(read('km,late\n1,0\n2,"1"x\n')).toBe(`f.csv, line 3 (the header is line 1): a closing quote is followed by other characters. | ${fix}`)
    expect(read('km,late\n1,0\n2,1"x\n')).toBe(`f.csv, line 3 (the header is line 1): a quote appears inside a field that does not start with one. | ${fix}`)
  })

  it('conflicting or dangling roles', () => {
    expect(read('km,late\n1,0\n', { roles: { kms: 'numeric' } })).toBe(
      "f.csv has no column 'kms', which has the role 'numeric'. Its columns are 'km', 'late'. | Correct the column name, or delete its role.",
    )
    expect(read('a,b,late\n1,2,0\n', { roles: { a: 'id', b: 'id' } })).toBe(
      "f.csv: only one column can be the id, but 'a', 'b' have the role 'id'. | Keep the role 'id' on one column.",
    )
    expect(read('a,b,late\n1,2,0\n', { roles: { a: 'target' } })).toBe(
      "f.csv: the target is 'late', but the column 'a' has the role 'target'. | Name the same column in both places, or only in one.",
    )
    expect(read('a,late\n1,0\n', { roles: { late: 'numeric' } })).toBe(
      "f.csv: the column 'late' is the target, but it also has the role 'numeric'. | Delete the other role of the target column.",
    )
  })
})

describe('parseCsv(text, options) on data files that packages ship', () => {
  it.skipIf(missingReference('python3-sklearn', 'test/core/data/parse-csv.test.ts', "the breast-cancer table") !== undefined)('reads scikit-learn\'s breast-cancer table as scikit-learn does', () => {
    // Debian python3-sklearn's breast_cancer.csv starts with "569,30,malignant,benign" instead of
    // column names; replace that line with names. Expected values computed with scikit-learn 1.2.1:
    // load_breast_cancer() has shape (569, 30), 357 targets equal to 1 (benign), data[:, 0].mean() =
    // 14.127291739894552 and data[:, 29].mean() = 0.0839458172231986.
    const raw = readFileSync(breastCancerCsv, 'utf8')
    const header = [...Array.from({ length: 30 }, (_, j) => `x${j}`), 'benign'].join(',')
    const data = parseCsv(`${header}\n${raw.slice(raw.indexOf('\n') + 1)}`, { source: 'breast_cancer.csv', target: 'benign' })
    const mean = (values: Float64Array) => values.reduce((a, b) => a + b, 0) / values.length
    expect(data.rows).toBe(569)
    expect(data.features.every((f) => f.kind === 'numeric')).toBe(true)
    expect(data.features).toHaveLength(30)
    expect(data.missing.every((m) => m === 0)).toBe(true)
    expect(data.target?.classes).toEqual(['0', '1'])
    expect(data.target!.values.reduce((a, b) => a + b, 0)).toBe(357)
    expect(mean(data.columns[0])).toBeCloseTo(14.127291739894552, 10)
    expect(mean(data.columns[29])).toBeCloseTo(0.0839458172231986, 12)
  })

  it('reads vega-datasets\' seattle-weather.csv with a categorical column', () => {
    // Expected values computed with Python's csv module and numpy (/usr/bin/python3): 1461 rows;
    // weather counts drizzle 53, fog 101, rain 641, snow 26, sun 640; mean precipitation 3.02943189596167.
    const text = readFileSync(new URL('../../../node_modules/vega-datasets/data/seattle-weather.csv', import.meta.url), 'utf8')
    const data = parseCsv(text, { source: 'seattle-weather.csv', target: 'precipitation', task: 'regression' })
    expect(data.rows).toBe(1461)
    expect(data.features.map((f) => [f.name, f.kind])).toEqual([
      ['date', 'categorical'],
      ['temp_max', 'numeric'],
      ['temp_min', 'numeric'],
      ['wind', 'numeric'],
      ['weather', 'categorical'],
    ])
    expect(data.features[4].categories).toEqual(['drizzle', 'fog', 'rain', 'snow', 'sun'])
    const counts = [0, 0, 0, 0, 0]
    for (const code of data.columns[4]) counts[code]++
    expect(counts).toEqual([53, 101, 641, 26, 640])
    expect(data.target!.values.reduce((a, b) => a + b, 0) / data.rows).toBeCloseTo(3.02943189596167, 10)
  })
})
