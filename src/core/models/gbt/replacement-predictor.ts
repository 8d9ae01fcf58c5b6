import type { FeatureMatrix } from '../../data/dataset.ts'
import type { ReplacementPredictor } from '../model.ts'
import type { Tree } from './tree.ts'

/**
 * What the fast path needs of a tree ensemble, whatever produced it (the built-in learner, or an
 * ONNX TreeEnsemble read by parseOnnxTreeEnsemble): raw score = baseScore + Σ tree outputs, then
 * the link. Trees route `value <= threshold` to the left and NaN by missingGoesLeft; node ids may
 * be in any order (they are renumbered for the walk).
 */
export interface EvaluableEnsemble {
  readonly featureNames: readonly string[]
  readonly baseScore: number
  readonly trees: readonly Tree[]
  /** 'logistic' turns the raw score into a probability 1 / (1 + e^-score). */
  readonly link: 'identity' | 'logistic'
  /** Round every input to float32 first (ONNX models with float32 thresholds compare in float32). */
  readonly float32Inputs?: boolean
}

/** Rows per block: a block's rows, replacement values and outputs stay in cache across all trees. */
const BLOCK_ROWS = 128

/**
 * Predictions for a fixed set of rows when only some columns are replaced, without re-running what
 * the replacement cannot change: permutation importance's inner loop, for every feature at once.
 *
 * A tree's output for a row changes only if the row's path passes a node that tests a replaced
 * column, and the path down to the first such node stays as it was. The base rows' raw scores are
 * computed once. Then, block by block of rows and tree by tree, each row walks its own path once;
 * at the first node testing a feature of some unit (a feature, or a group replaced jointly), and
 * only there, the row walks the rest of the tree once per draw with that unit's values, and the
 * unit's prediction moves by (new leaf − the row's leaf). Trees whose path does not test the unit
 * are never re-walked. With depth-d trees over F features a path tests at most d of them, so one
 * unit re-walks at most about d/F of the (row, tree) pairs, each from part-way down; the row's own
 * leaf comes from its own walk in the same pass, so nothing per (row, tree) is stored.
 *
 * Exact routing: every row reaches the leaf a full evaluation of the replaced matrix reaches; the
 * sum differs from a full evaluation's only by floating-point reassociation (about 1e-15 relative),
 * and with nothing replaced it is bit-identical to it.
 * Memory: the base rows row-major (rows × features floats) and the outputs; no per-tree state.
 */
export function createTreeReplacementPredictor(ensemble: EvaluableEnsemble, base: FeatureMatrix): ReplacementPredictor | undefined {
  const trees = ensemble.trees.map(compileTree)
  const position = new Map(base.features.map((f, j) => [f.name, j]))
  const names = ensemble.featureNames
  const F = names.length
  const n = base.rows
  const round = ensemble.float32Inputs === true
  // Row-major base values: x[i * F + f].
  const x = new Float64Array(n * F)
  names.forEach((name, f) => {
    const j = position.get(name)
    if (j === undefined) throw new RangeError(`createTreeReplacementPredictor: the matrix has no feature named '${name}'`)
    const column = base.columns[j]
    for (let i = 0, at = f; i < n; i++, at += F) x[at] = round ? Math.fround(column[i]) : column[i]
  })
  const raw = new Float64Array(n).fill(ensemble.baseScore)
  for (const tree of trees) addTree(tree, x, F, n, raw)
  const isLogistic = ensemble.link === 'logistic'
  const byName = new Map(names.map((name, f) => [name, f]))
  const maxDepth = Math.max(1, ...trees.map(treeDepth))

  const predictMany = (units: readonly ReadonlyMap<string, Float64Array>[], draws: number): Float64Array[] => {
    if (!Number.isInteger(draws) || draws < 1) throw new RangeError(`ReplacementPredictor.predict needs draws >= 1, got ${draws}`)
    // singleOf[f]: the unit that replaces feature f alone (-1: none). Units of several features are groups.
    const singleOf = new Int32Array(F).fill(-1)
    const groups: { unit: number; features: number[]; values: Float64Array[] }[] = []
    const singleValues: Float64Array[] = new Array(F)
    const outputs = units.map(() => {
      const out = new Float64Array(n * draws)
      for (let k = 0; k < draws; k++) out.set(raw, k * n)
      return out
    })
    units.forEach((replaced, u) => {
      const features: number[] = []
      const values: Float64Array[] = []
      for (const [name, column] of replaced) {
        const f = byName.get(name)
        if (f === undefined) continue // the model does not use it: nothing changes
        if (column.length !== n * draws) {
          throw new RangeError(`ReplacementPredictor.predict: '${name}' has ${column.length} values, expected ${n * draws}`)
        }
        features.push(f)
        values.push(round ? column.map(Math.fround) : column)
      }
      if (features.length === 1 && singleOf[features[0]] < 0) {
        singleOf[features[0]] = u
        singleValues[features[0]] = values[0]
      } else if (features.length > 0) groups.push({ unit: u, features, values })
    })
    const groupSlot = groups.map(() => new Int32Array(F).fill(-1))
    groups.forEach((g, q) => g.features.forEach((f, r) => (groupSlot[q][f] = r)))
    // Per row and tree: the distinct features on the path and the first node testing each.
    const pathFeature = new Int32Array(maxDepth)
    const pathNode = new Int32Array(maxDepth)
    const seen = new Uint8Array(F)
    const kept = new Float64Array(F)
    for (let start = 0; start < n; start += BLOCK_ROWS) {
      const stop = Math.min(n, start + BLOCK_ROWS)
      for (const tree of trees) {
        const { feature, threshold, left, missingRight, value } = tree
        for (let i = start; i < stop; i++) {
          const row = i * F
          let node = 0
          let f = feature[0]
          let found = 0
          while (f >= 0) {
            if (seen[f] === 0) {
              seen[f] = 1
              pathFeature[found] = f
              pathNode[found++] = node
            }
            const v = x[row + f]
            node = left[node] + (+(v > threshold[node]) | (+(v !== v) & missingRight[node]))
            f = feature[node]
          }
          const own = value[node]
          for (let p = 0; p < found; p++) {
            const g = pathFeature[p]
            seen[g] = 0
            const u = singleOf[g]
            if (u >= 0) walkOne(tree, pathNode[p], x, row, g, singleValues[g], i, n, draws, own, outputs[u])
          }
          for (let q = 0; q < groups.length; q++) {
            // The earliest first node among the group's features (ids grow along the path).
            const slot = groupSlot[q]
            let from = -1
            for (let p = 0; p < found && from < 0; p++) if (slot[pathFeature[p]] >= 0) from = pathNode[p]
            if (from < 0) continue
            const { features, values } = groups[q]
            for (let m = 0; m < features.length; m++) kept[m] = x[row + features[m]]
            walkReplaced(tree, from, x, row, features, values, i, n, draws, own, outputs[groups[q].unit])
            for (let m = 0; m < features.length; m++) x[row + features[m]] = kept[m]
          }
        }
      }
    }
    if (isLogistic) for (const out of outputs) for (let i = 0; i < out.length; i++) out[i] = 1 / (1 + Math.exp(-out[i]))
    return outputs
  }

  return {
    rows: n,
    predict: (replaced, draws) => predictMany([replaced], draws)[0],
    predictMany,
  }
}

/**
 * Row i walks from `from` once per draw with the given features replaced; the output moves by the
 * leaf change. The replacement values are written into the row of x itself for the walk (so a step
 * reads x alone, with no test for "is this feature replaced") and the row is restored afterwards.
 */
function walkReplaced(
  tree: CompiledTree,
  from: number,
  x: Float64Array,
  row: number,
  features: readonly number[],
  values: readonly Float64Array[],
  i: number,
  n: number,
  draws: number,
  own: number,
  out: Float64Array,
): void {
  const { feature, threshold, left, missingRight, value } = tree
  const members = features.length
  for (let k = 0, at = i; k < draws; k++, at += n) {
    for (let m = 0; m < members; m++) x[row + features[m]] = values[m][at]
    let node = from
    let f = feature[node]
    while (f >= 0) {
      const v = x[row + f]
      node = left[node] + (+(v > threshold[node]) | (+(v !== v) & missingRight[node]))
      f = feature[node]
    }
    out[at] += value[node] - own
  }
}

/** walkReplaced for one feature, the common case: the replaced value is taken where the feature is tested. */
function walkOne(
  tree: CompiledTree,
  from: number,
  x: Float64Array,
  row: number,
  target: number,
  values: Float64Array,
  i: number,
  n: number,
  draws: number,
  own: number,
  out: Float64Array,
): void {
  const { feature, threshold, left, missingRight, value } = tree
  for (let k = 0, at = i; k < draws; k++, at += n) {
    const replaced = values[at]
    let node = from
    let f = feature[node]
    while (f >= 0) {
      const v = f === target ? replaced : x[row + f]
      node = left[node] + (+(v > threshold[node]) | (+(v !== v) & missingRight[node]))
      f = feature[node]
    }
    out[at] += value[node] - own
  }
}

function addTree(tree: CompiledTree, x: Float64Array, F: number, n: number, score: Float64Array): void {
  const { feature, threshold, left, missingRight, value } = tree
  for (let i = 0, row = 0; i < n; i++, row += F) {
    let node = 0
    let f = feature[0]
    while (f >= 0) {
      const v = x[row + f]
      node = left[node] + (+(v > threshold[node]) | (+(v !== v) & missingRight[node]))
      f = feature[node]
    }
    score[i] += value[node]
  }
}

/**
 * A tree renumbered breadth-first, so that a node's right child is its left child + 1 and every
 * child comes after its parent: a step is node = left[node] + goesRight, without a branch on the
 * comparison (tree walks are otherwise dominated by mispredicted branches). missingRight[node] is 1
 * when NaN goes right. Leaves have feature -1.
 */
interface CompiledTree {
  readonly feature: Int32Array
  readonly threshold: Float64Array
  readonly left: Int32Array
  readonly missingRight: Uint8Array
  readonly value: Float64Array
}

function compileTree(tree: Tree): CompiledTree {
  const m = tree.feature.length
  const feature = new Int32Array(m)
  const threshold = new Float64Array(m)
  const left = new Int32Array(m)
  const missingRight = new Uint8Array(m)
  const value = new Float64Array(m)
  const queue = new Int32Array(m)
  queue[0] = 0
  let head = 0
  let tail = 1
  while (head < tail) {
    const at = head
    const old = queue[head++]
    feature[at] = tree.feature[old]
    if (tree.feature[old] < 0) {
      value[at] = tree.value[old]
      continue
    }
    threshold[at] = tree.threshold[old]
    missingRight[at] = tree.missingGoesLeft[old] === 1 ? 0 : 1
    if (tail + 2 > m) throw new RangeError('createTreeReplacementPredictor: a tree reaches more nodes than it has (a cycle)')
    left[at] = tail
    queue[tail++] = tree.left[old]
    queue[tail++] = tree.right[old]
  }
  return { feature: feature.subarray(0, tail), threshold, left, missingRight, value }
}

/** Internal nodes on the longest path (children after parents, so one forward pass). */
function treeDepth(tree: CompiledTree): number {
  const depth = new Int32Array(tree.feature.length)
  let most = 0
  for (let node = 0; node < tree.feature.length; node++) {
    if (tree.feature[node] < 0) continue
    const d = depth[node] + 1
    most = Math.max(most, d)
    depth[tree.left[node]] = d
    depth[tree.left[node] + 1] = d
  }
  return most
}
