/**
 * The wine table (178 rows, 13 features, three cultivars) that scikit-learn ships, read from Debian's
 * python3-sklearn (1.2.1) at /usr/lib/python3/dist-packages/sklearn/datasets/data/wine_data.csv (a
 * header line "178,13,class_0,class_1,class_2", then 13 features and the class 0, 1 or 2), and
 * written as a CSV with load_wine's feature names and the target `cultivar` as the class names
 * class_0, class_1, class_2 (text labels, as a user's file would have them).
 */
import { existsSync, readFileSync } from 'node:fs'

export const wineCsv = '/usr/lib/python3/dist-packages/sklearn/datasets/data/wine_data.csv'
export const hasWine = existsSync(wineCsv)

export const wineFeatures = [
  'alcohol', 'malic_acid', 'ash', 'alcalinity_of_ash', 'magnesium', 'total_phenols', 'flavanoids',
  'nonflavanoid_phenols', 'proanthocyanins', 'color_intensity', 'hue', 'od280_od315', 'proline',
]

export interface WineTable {
  readonly rows: number[][]
  readonly target: number[]
}

export function readWine(): WineTable {
  const values = readFileSync(wineCsv, 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number))
  return { rows: values.map((v) => v.slice(0, 13)), target: values.map((v) => v[13]) }
}

/** CSV text of the rows `indices`, with an extra column (rounded to 4 decimals) before the target if given. */
export function wineCsvText(table: WineTable, indices: readonly number[], extra?: { name: string; values: readonly number[] }): string {
  const header = [...wineFeatures, ...(extra ? [extra.name] : []), 'cultivar']
  const lines = indices.map((i) => [...table.rows[i], ...(extra ? [Number(extra.values[i].toFixed(4))] : []), `class_${table.target[i]}`].join(','))
  return `${header.join(',')}\n${lines.join('\n')}\n`
}
