import type { FeatureMatrix } from '../../data/dataset.ts'
import type { ReplacementPredictor } from '../model.ts'
import type { BoostedEnsemble } from './tree.ts'

/**
 * Predictions for a fixed set of rows when only some columns are replaced, without re-running every
 * tree: permutation importance's inner loop.
 *
 * A tree's output for a row changes only if the row's original path passes a node that splits on a
 * replaced column. So for the base rows we cache, per tree, each row's leaf value, and per (feature,
 * tree) the rows whose path tests that feature. A replacement then re-evaluates only those rows in
 * those trees: prediction = cached raw score + Σ over touched trees (new leaf − cached leaf). With
 * depth-d trees over F features a path tests at most d of them, so a single-feature replacement
 * re-evaluates about d/F of the (row, tree) pairs instead of all. Exact: the same sums in the same
 * tree order as BoostedModel.predictRaw, up to floating-point reassociation (~1e-15 relative).
 *
 * Memory: one float per (row, tree) plus one int per (row, tree, distinct feature on the path).
 */
export function createTreeReplacementPredictor(ensemble: BoostedEnsemble, base: FeatureMatrix): ReplacementPredictor {
  const position = new Map(base.features.map((f, j) => [f.name, j]))
  const names = ensemble.featureNames
  const columns = names.map((name) => {
    const j = position.get(name)
    if (j === undefined) throw new RangeError(`createTreeReplacementPredictor: the matrix has no feature named '${name}'`)
    return base.columns[j]
  })
  const n = base.rows
  const trees = ensemble.trees
  const F = names.length
  const raw = new Float64Array(n).fill(ensemble.baseScore)
  const leaf: Float64Array[] = []
  // touched[t][f]: rows whose path in tree t tests feature f (ascending).
  const touched: Int32Array[][] = []
  const seenAt = new Int32Array(F).fill(-1)
  for (let t = 0; t < trees.length; t++) {
    const { feature, threshold, left, right, missingGoesLeft, value } = trees[t]
    const leaves = new Float64Array(n)
    const lists: number[][] = Array.from({ length: F }, () => [])
    for (let i = 0; i < n; i++) {
      let node = 0
      let f = feature[0]
      while (f >= 0) {
        if (seenAt[f] !== i) {
          seenAt[f] = i
          lists[f].push(i)
        }
        const v = columns[f][i]
        node = (v !== v ? missingGoesLeft[node] === 1 : v <= threshold[node]) ? left[node] : right[node]
        f = feature[node]
      }
      leaves[i] = value[node]
      raw[i] += value[node]
    }
    seenAt.fill(-1)
    leaf.push(leaves)
    touched.push(lists.map((l) => Int32Array.from(l)))
  }
  const isBinary = ensemble.task === 'binary'

  return {
    rows: n,
    predict(replaced: ReadonlyMap<string, Float64Array>, draws: number): Float64Array {
      const replacedIndex: number[] = []
      const replacement: Float64Array[] = []
      for (const [name, values] of replaced) {
        const f = names.indexOf(name)
        if (f < 0) continue // the model does not use it: nothing changes
        if (values.length !== n * draws) {
          throw new RangeError(`ReplacementPredictor.predict: '${name}' has ${values.length} values, expected ${n * draws}`)
        }
        replacedIndex.push(f)
        replacement.push(values)
      }
      const out = new Float64Array(n * draws)
      for (let k = 0; k < draws; k++) out.set(raw, k * n)
      if (replacedIndex.length > 0) {
        const isReplaced = new Int32Array(F).fill(-1)
        replacedIndex.forEach((f, r) => (isReplaced[f] = r))
        const mark = new Uint8Array(n)
        for (let t = 0; t < trees.length; t++) {
          const { feature, threshold, left, right, missingGoesLeft, value } = trees[t]
          const rows = unionRows(touched[t], replacedIndex, mark)
          const leaves = leaf[t]
          for (let k = 0; k < draws; k++) {
            const offset = k * n
            for (let p = 0; p < rows.length; p++) {
              const i = rows[p]
              let node = 0
              let f = feature[0]
              while (f >= 0) {
                const r = isReplaced[f]
                const v = r >= 0 ? replacement[r][offset + i] : columns[f][i]
                node = (v !== v ? missingGoesLeft[node] === 1 : v <= threshold[node]) ? left[node] : right[node]
                f = feature[node]
              }
              out[offset + i] += value[node] - leaves[i]
            }
          }
        }
      }
      if (isBinary) for (let i = 0; i < out.length; i++) out[i] = 1 / (1 + Math.exp(-out[i]))
      return out
    },
  }
}

/** Rows touched in one tree by any of the features (one feature: its list as is). */
function unionRows(lists: Int32Array[], features: readonly number[], mark: Uint8Array): Int32Array {
  if (features.length === 1) return lists[features[0]]
  const rows: number[] = []
  for (const f of features) {
    for (const i of lists[f]) {
      if (mark[i] === 0) {
        mark[i] = 1
        rows.push(i)
      }
    }
  }
  for (const i of rows) mark[i] = 0
  rows.sort((a, b) => a - b)
  return Int32Array.from(rows)
}
