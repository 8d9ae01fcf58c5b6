import type { Task } from '../../data/dataset.ts'
import { InternalError } from '../../errors.ts'
import { createRandom, type Random } from '../../statistics/random.ts'
import { MISSING_BIN, type BinnedFeatures } from './bin-features.ts'
import { BoostedModel, type SplitStatistic } from './boosted-model.ts'
import { resolveTrainingSubset } from '../resolve-training-subset.ts'
import type { Tree } from './tree.ts'

/** How a boosted ensemble is grown. */
export interface BoostingSettings {
  /** Number of boosting rounds (one tree each). */
  readonly trees: number
  /** Depth-wise growth stops at this depth (the root is depth 0; depth d gives up to 2^d leaves). */
  readonly maxDepth: number
  /** Shrinkage: each tree's leaf values are multiplied by it. */
  readonly learningRate: number
  /** A split is allowed only when both children get at least this many (sampled) rows. */
  readonly minRowsPerLeaf: number
  /** L2 penalty on leaf values (XGBoost's lambda). */
  readonly l2: number
  /** Fraction of the training rows each tree is grown on, drawn without replacement. */
  readonly rowSubsample: number
  /** Fraction of the allowed features each tree may split on. */
  readonly columnSubsample: number
}

/**
 * The smallest hessian sum a child may have. For squared error every row has hessian 1, so this adds
 * nothing to minRowsPerLeaf; for log loss it keeps a leaf of confidently predicted rows (hessians
 * p(1-p) near 0) from taking a huge Newton step. 1 is XGBoost's default min_child_weight.
 */
export const MIN_HESSIAN_PER_LEAF = 1

export interface FitBoostedOptions {
  readonly task: Task
  readonly settings: BoostingSettings
  readonly seed: number
  /** Training row indices into `binned`, in the order to use (default: every row in order). */
  readonly rows?: ArrayLike<number>
  /** Column indices of `binned` the trees may split on (default: all). */
  readonly features?: readonly number[]
  /**
   * Column indices of `binned` to leave out (drop-column / LOCO refits): the fit is the one on the
   * table without those columns, from the same bins, with no re-binning. Applied after `features`.
   */
  readonly excludeFeatures?: readonly number[]
  /** Multiclass only: K, the number of classes (targets are class indices 0..K-1). */
  readonly classCount?: number
}

/**
 * Gradient-boosted regression trees on binned features (Friedman 2001, "Greedy function
 * approximation", Annals of Statistics 29(5)), with XGBoost's second-order objective (Chen & Guestrin
 * 2016, "XGBoost: A scalable tree boosting system", KDD): each tree fits gradients g and hessians h
 * of the loss at the current score; a leaf's value is -G/(H + l2) (eq. 5) and a split's gain is
 * 1/2 [GL^2/(HL+l2) + GR^2/(HR+l2) - G^2/(H+l2)] (eq. 7, no gamma). Losses: squared error
 * (regression, g = score - y, h = 1) and log loss (binary, g = p - y, h = p(1 - p)).
 * Multiclass (softmax boosting, Friedman 2001, section 4.6): each round grows K trees, tree k on the
 * multinomial log loss's gradient and hessian for class k at the round's softmax probabilities p,
 * g = p_k - [y = k], h = max(2 p_k (1 - p_k), 1e-16), as XGBoost's multi:softprob objective does
 * (from memory of its source, src/objective/multiclass_obj.cu; the factor 2 is XGBoost's);
 * the K trees of a round share the bins and are grown one after another by the same grower.
 *
 * Trees grow depth-wise on histograms of (G, H, count) per bin; of two children only the smaller
 * one's histogram is built, the larger is parent minus smaller. Missing values are routed by a
 * learned default direction (sparsity-aware split finding, Chen & Guestrin 2016, Algorithm 3): each
 * candidate tries the missing bin on both sides. When a node has no missing rows, missing values go
 * to the child with more rows. Each tree draws its rows without replacement (Knuth's Algorithm S,
 * TAOCP vol. 2, 3.4.2) and its features the same way, from createRandom(seed); with both fractions 1
 * the seed changes nothing. Same inputs and seed give a bit-identical model.
 *
 * The model's features are the allowed ones, in the binned matrix's order; thresholds are raw values
 * (BinnedFeatures.upperEdges), so the model predicts from unbinned data.
 * Edges: a node too small to split, or with no split of positive gain, becomes a leaf; a target
 * with one class gets a base score of log-odds of a rate clamped to [1e-6, 1 - 1e-6].
 * Cost: O(trees x depth x sampled rows x features) for histograms plus O(trees x nodes x features x bins)
 * for split search. Memory: up to 2^(maxDepth-1) + 1 histograms of features x 256 x 3 doubles (x 2
 * for squared error), plus two bytes per row and feature for the codes (row-major and column-major
 * copies) and three row lists of 4 bytes per row (the order and two partition scratch lists).
 * Split gains are reported in the eq. 7 form, with the 1/2; XGBoost's own gain statistic leaves it
 * out (from memory of its source), so ours are half of XGBoost's for the same split.
 */
export function fitBoosted(binned: BinnedFeatures, target: Float64Array, options: FitBoostedOptions): BoostedModel {
  const { task, settings } = options
  checkSettings(settings)
  const { positions, features: allowed, y } = resolveTrainingSubset(
    'fitBoosted', { rows: binned.rows, features: binned.features.length }, target, task, options,
  )
  const used = leaveOut(allowed, options.excludeFeatures, binned.features.length)
  const n = positions.length
  const featureCount = used.length
  const rowCodes = gatherRowMajor(binned.codes, used, positions)
  const columnCodes = gatherColumns(binned.codes, used, positions)
  const binCounts = Int32Array.from(used, (j) => binned.binCounts[j])
  const classCount = task === 'multiclass' ? checkClassCount(options.classCount, y) : 1
  let targetSum = 0
  for (let p = 0; p < n; p++) targetSum += y[p]
  const baseScore = task === 'multiclass' ? 0 : task === 'regression' ? targetSum / n : logOdds(targetSum / n)

  const sampleSize = Math.max(1, Math.round(settings.rowSubsample * n))
  const treeFeatureCount = Math.min(featureCount, Math.max(1, Math.round(settings.columnSubsample * featureCount)))
  const grower = new TreeGrower(rowCodes, columnCodes, binCounts, n, settings, task === 'regression')
  const scores = Array.from({ length: classCount }, () => new Float64Array(n).fill(baseScore))
  const score = scores[0]
  const classGradients = classCount > 1 ? scores.map(() => new Float64Array(n)) : []
  const classHessians = classCount > 1 ? scores.map(() => new Float64Array(n)) : []
  const random = createRandom(options.seed)
  const allFeatures = Int32Array.from({ length: featureCount }, (_, k) => k)
  const gainByFeature = new Float64Array(featureCount)
  const splitsByFeature = new Int32Array(featureCount)
  const trees: Tree[] = []
  const upperEdges = used.map((j) => binned.upperEdges[j])

  for (let t = 0; t < settings.trees; t++) {
    if (classCount > 1) {
      computeSoftmaxGradients(y, scores, classGradients, classHessians)
      for (let k = 0; k < classCount; k++) {
        grower.gradient.set(classGradients[k])
        grower.hessian.set(classHessians[k])
        const rowCount = sampleSorted(n, sampleSize, random, grower.order)
        const treeFeatures =
          treeFeatureCount === featureCount ? allFeatures : sampleFeatures(featureCount, treeFeatureCount, random)
        grower.grow(rowCount, treeFeatures, scores[k])
        grower.addToScores(scores[k], rowCount)
        grower.addSplitStatistics(gainByFeature, splitsByFeature)
        trees.push(grower.toTree(upperEdges))
      }
      continue
    }
    computeGradients(task, y, score, grower.gradient, grower.hessian)
    const rowCount = sampleSorted(n, sampleSize, random, grower.order)
    const treeFeatures =
      treeFeatureCount === featureCount ? allFeatures : sampleFeatures(featureCount, treeFeatureCount, random)
    grower.grow(rowCount, treeFeatures, score)
    grower.addToScores(score, rowCount)
    grower.addSplitStatistics(gainByFeature, splitsByFeature)
    trees.push(grower.toTree(upperEdges))
  }

  const featureNames = used.map((j) => binned.features[j].name)
  const splitStatistics: SplitStatistic[] = featureNames.map((feature, k) => ({
    feature,
    gain: gainByFeature[k],
    splits: splitsByFeature[k],
  }))
  return new BoostedModel({ task, featureNames, baseScore, trees, ...(classCount > 1 ? { classCount } : {}) }, splitStatistics)
}

/** K for a multiclass fit: a whole number >= 3 that every target index is below. */
function checkClassCount(classCount: number | undefined, y: Float64Array): number {
  if (classCount === undefined || !Number.isInteger(classCount) || classCount < 3) {
    throw new RangeError(`fitBoosted needs options.classCount >= 3 for a multiclass task, got ${classCount}`)
  }
  for (let p = 0; p < y.length; p++) {
    if (y[p] >= classCount) throw new RangeError(`fitBoosted: a target is class ${y[p]}, but options.classCount is ${classCount}`)
  }
  return classCount
}

/**
 * Softmax probabilities of the K scores of every row, then each class's gradient and hessian of the
 * multinomial log loss: g_k = p_k - [y = k], h_k = max(2 p_k (1 - p_k), 1e-16) (XGBoost's multi:softprob).
 */
function computeSoftmaxGradients(y: Float64Array, scores: readonly Float64Array[], g: readonly Float64Array[], h: readonly Float64Array[]): void {
  const k = scores.length
  const n = y.length
  const p = new Float64Array(k)
  for (let i = 0; i < n; i++) {
    let max = -Infinity
    for (let c = 0; c < k; c++) max = Math.max(max, scores[c][i])
    let total = 0
    for (let c = 0; c < k; c++) {
      p[c] = Math.exp(scores[c][i] - max)
      total += p[c]
    }
    for (let c = 0; c < k; c++) {
      const q = p[c] / total
      g[c][i] = q - (y[i] === c ? 1 : 0)
      h[c][i] = Math.max(2 * q * (1 - q), 1e-16)
    }
  }
}

/** `allowed` without the excluded column indices; throws RangeError on a bad index or when none is left. */
function leaveOut(allowed: readonly number[], excluded: readonly number[] | undefined, width: number): readonly number[] {
  if (!excluded || excluded.length === 0) return allowed
  for (const j of excluded) {
    if (!Number.isInteger(j) || j < 0 || j >= width) {
      throw new RangeError(`fitBoosted: excludeFeatures contains ${j}, not a column index from 0 to ${width - 1}`)
    }
  }
  const drop = new Set(excluded)
  const kept = allowed.filter((j) => !drop.has(j))
  if (kept.length === 0) throw new RangeError('fitBoosted: excludeFeatures leaves no feature to split on')
  return kept
}

function checkSettings(s: BoostingSettings): void {
  const wholeAtLeast = (name: keyof BoostingSettings, min: number) => {
    if (!Number.isInteger(s[name]) || s[name] < min) {
      throw new RangeError(`fitBoosted needs settings.${name} to be a whole number >= ${min}, got ${s[name]}`)
    }
  }
  const fraction = (name: keyof BoostingSettings) => {
    if (!(s[name] > 0 && s[name] <= 1)) throw new RangeError(`fitBoosted needs settings.${name} in (0, 1], got ${s[name]}`)
  }
  wholeAtLeast('trees', 0)
  wholeAtLeast('maxDepth', 0)
  wholeAtLeast('minRowsPerLeaf', 1)
  if (s.maxDepth > 16) throw new RangeError(`fitBoosted needs settings.maxDepth <= 16, got ${s.maxDepth}`)
  if (!(s.learningRate > 0) || !Number.isFinite(s.learningRate)) {
    throw new RangeError(`fitBoosted needs settings.learningRate > 0, got ${s.learningRate}`)
  }
  if (!(s.l2 >= 0) || !Number.isFinite(s.l2)) throw new RangeError(`fitBoosted needs settings.l2 >= 0, got ${s.l2}`)
  fraction('rowSubsample')
  fraction('columnSubsample')
}

/** The used columns' codes at the training positions, row-major: out[p * used.length + k]. */
function gatherRowMajor(codes: readonly Uint8Array[], used: readonly number[], positions: Int32Array): Uint8Array {
  const width = used.length
  const out = new Uint8Array(positions.length * width)
  for (let k = 0; k < width; k++) {
    const column = codes[used[k]]
    for (let p = 0, at = k; p < positions.length; p++, at += width) out[at] = column[positions[p]]
  }
  return out
}

/** The used columns' codes at the training positions, one array per used column: out[k][p]. */
function gatherColumns(codes: readonly Uint8Array[], used: readonly number[], positions: Int32Array): Uint8Array[] {
  return used.map((j) => {
    const column = codes[j]
    const out = new Uint8Array(positions.length)
    for (let p = 0; p < positions.length; p++) out[p] = column[positions[p]]
    return out
  })
}

function logOdds(rate: number): number {
  const r = Math.min(1 - 1e-6, Math.max(1e-6, rate))
  return Math.log(r / (1 - r))
}

function computeGradients(task: Task, y: Float64Array, score: Float64Array, g: Float64Array, h: Float64Array): void {
  const n = y.length
  if (task === 'regression') {
    for (let i = 0; i < n; i++) {
      g[i] = score[i] - y[i]
      h[i] = 1
    }
    return
  }
  for (let i = 0; i < n; i++) {
    const p = 1 / (1 + Math.exp(-score[i]))
    g[i] = p - y[i]
    h[i] = p * (1 - p)
  }
}

/** m of 0..n-1 without replacement, ascending, into out (Knuth's Algorithm S). Returns m. */
function sampleSorted(n: number, m: number, random: Random, out: Int32Array): number {
  if (m >= n) {
    for (let i = 0; i < n; i++) out[i] = i
    return n
  }
  let chosen = 0
  for (let i = 0; i < n && chosen < m; i++) {
    if ((n - i) * random.next() < m - chosen) out[chosen++] = i
  }
  return chosen
}

function sampleFeatures(total: number, count: number, random: Random): Int32Array {
  const out = new Int32Array(count)
  sampleSorted(total, count, random, out)
  return out
}

/** Histogram slots per feature: value bins 0..254 and the missing bin 255. */
const SLOTS_PER_FEATURE = 256

/**
 * The reusable state of growing one tree at a time, allocated once per fit: row order, gradients,
 * row-major bin codes, a histogram pool, and the tree in bin space.
 *
 * Histograms are flat Float64Arrays, SLOTS_PER_FEATURE slots per tree feature, each slot holding
 * (gradient sum, hessian sum, row count), or (gradient sum, row count) when every hessian is 1
 * (squared error), where the count is the hessian sum. Codes are row-major (all of a row's codes in
 * one cache line) because the histogram loop walks rows and adds each row to every feature; the
 * column-major copy serves the root's histogram and the partitions, which read one feature.
 *
 * Where a fit of 200,000 x 30 rows spends its time (node --cpu-prof of the bench bundle, 300 trees,
 * depth 6): the node histograms about 40%, the root histograms about 25% (each tree's root reads
 * every row, the other levels together about 1.4 rows per row), partitions about 10%, split search
 * about 5%, binning about 3%.
 */
class TreeGrower {
  readonly gradient: Float64Array
  readonly hessian: Float64Array
  /** Sampled row positions, grouped by node: node i's rows are order[begin[i]..end[i]). */
  readonly order: Int32Array
  private readonly scratch: Int32Array
  private readonly scratchRights: Int32Array
  /** Per bin code, 1 when the split being applied sends it left. */
  private readonly goesLeft = new Uint8Array(SLOTS_PER_FEATURE)
  /** The training scores of the fit, updated by the last level's leaves while a tree grows. */
  private score: Float64Array = new Float64Array(0)
  /** The leaf values of the last level's two children: [right, left], indexed by goesLeft. */
  private readonly childValues = new Float64Array(2)
  private nodeBeingSplit = 0
  private readonly slot: number
  private readonly featureStride: number
  private readonly featureCount: number
  // The current tree's features: tree feature t is fit-local feature treeFeatures[t].
  private treeFeatures: Int32Array = new Int32Array(0)
  private width = 0
  /** Row counts per bin of every feature over all positions (the root's counts when a tree uses every row). */
  private readonly allRowCounts: Float64Array
  private readonly treeBins: Int32Array
  // The tree being grown, node-indexed in creation (breadth-first) order. feature is the tree feature t.
  private nodeCount = 0
  private readonly feature: Int32Array
  private readonly splitBin: Int32Array
  private readonly missingLeft: Uint8Array
  private readonly left: Int32Array
  private readonly right: Int32Array
  private readonly value: Float64Array
  private readonly gain: Float64Array
  private readonly begin: Int32Array
  private readonly end: Int32Array
  private readonly sumGradient: Float64Array
  private readonly sumHessian: Float64Array
  /** Histogram buffer of a node, -1 when it has none. */
  private readonly histogramOf: Int32Array
  private readonly histograms: Float64Array[] = []
  private readonly freeHistograms: number[] = []
  // The best split found by findSplit.
  private bestGain = 0
  private bestFeature = -1
  private bestBin = -1
  private bestMissingLeft = 0
  private bestLeftGradient = 0
  private bestLeftHessian = 0
  private bestLeftCount = 0

  constructor(
    /** Row-major codes of every allowed feature: rowCodes[p * featureCount + k]. */
    private readonly rowCodes: Uint8Array,
    /** The same codes column by column: columnCodes[k][p]. */
    private readonly columnCodes: readonly Uint8Array[],
    private readonly binCounts: Int32Array,
    n: number,
    private readonly settings: BoostingSettings,
    private readonly isUnitHessian: boolean,
  ) {
    this.gradient = new Float64Array(n)
    this.hessian = new Float64Array(n)
    this.order = new Int32Array(n)
    this.scratch = new Int32Array(n)
    this.scratchRights = new Int32Array(n)
    this.slot = isUnitHessian ? 2 : 3
    this.featureStride = this.slot * SLOTS_PER_FEATURE
    this.featureCount = columnCodes.length
    this.treeBins = new Int32Array(this.featureCount)
    this.allRowCounts = new Float64Array(this.featureCount * SLOTS_PER_FEATURE)
    columnCodes.forEach((column, k) => {
      const base = k * SLOTS_PER_FEATURE
      for (let p = 0; p < n; p++) this.allRowCounts[base + column[p]]++
    })
    const m = 2 ** (settings.maxDepth + 1) - 1
    this.feature = new Int32Array(m)
    this.splitBin = new Int32Array(m)
    this.missingLeft = new Uint8Array(m)
    this.left = new Int32Array(m)
    this.right = new Int32Array(m)
    this.value = new Float64Array(m)
    this.gain = new Float64Array(m)
    this.begin = new Int32Array(m)
    this.end = new Int32Array(m)
    this.sumGradient = new Float64Array(m)
    this.sumHessian = new Float64Array(m)
    this.histogramOf = new Int32Array(m)
  }

  /**
   * Grows one tree on order[0..rowCount) with the given features (fit-local indices, ascending). The
   * leaves of the last level add their values to `score` as their parent is split; addToScores adds
   * the other leaves' values and those of rows left out of the sample.
   */
  grow(rowCount: number, treeFeatures: Int32Array, score: Float64Array): void {
    this.score = score
    this.useFeatures(treeFeatures)
    const { settings, gradient, hessian, order } = this
    let g = 0
    let h = 0
    for (let i = 0; i < rowCount; i++) {
      g += gradient[order[i]]
      h += hessian[order[i]]
    }
    this.nodeCount = 1
    this.begin[0] = 0
    this.end[0] = rowCount
    this.sumGradient[0] = g
    this.sumHessian[0] = h
    this.histogramOf[0] = -1
    if (settings.maxDepth > 0 && this.canSplit(0)) {
      this.histogramOf[0] = this.takeHistogram()
      this.buildHistogram(this.histograms[this.histogramOf[0]], 0)
    }
    let levelStart = 0
    for (let depth = 0; depth <= settings.maxDepth; depth++) {
      const levelEnd = this.nodeCount
      const childrenAreLeaves = depth + 1 >= settings.maxDepth
      for (let node = levelStart; node < levelEnd; node++) {
        if (this.histogramOf[node] >= 0 && this.findSplit(node)) this.split(node, childrenAreLeaves)
        else this.makeLeaf(node)
        if (this.histogramOf[node] >= 0) {
          this.freeHistograms.push(this.histogramOf[node])
          this.histogramOf[node] = -1
        }
      }
      levelStart = levelEnd
    }
  }

  /** Records this tree's features; the codes are read through treeFeatures, never copied per tree. */
  private useFeatures(treeFeatures: Int32Array): void {
    const width = treeFeatures.length
    this.treeFeatures = treeFeatures
    this.width = width
    for (let t = 0; t < width; t++) this.treeBins[t] = this.binCounts[treeFeatures[t]]
  }

  private canSplit(node: number): boolean {
    return (
      this.end[node] - this.begin[node] >= 2 * this.settings.minRowsPerLeaf &&
      this.sumHessian[node] >= 2 * MIN_HESSIAN_PER_LEAF
    )
  }

  private makeLeaf(node: number): void {
    this.feature[node] = -1
    this.value[node] = this.leafValue(this.sumGradient[node], this.sumHessian[node])
  }

  private leafValue(sumGradient: number, sumHessian: number): number {
    return (-sumGradient / (sumHessian + this.settings.l2)) * this.settings.learningRate
  }

  /**
   * The split of a node whose children are leaves, without the partition: each of its rows adds its
   * child's value (what makeLeaf will give it) to its score. Returns from + the number of rows that
   * go left, as partition would.
   */
  private scoreLastLevel(from: number, to: number, column: Uint8Array): number {
    const { order, goesLeft, score, childValues } = this
    const leftGradient = this.bestLeftGradient
    const leftHessian = this.bestLeftHessian
    childValues[1] = this.leafValue(leftGradient, leftHessian)
    childValues[0] = this.leafValue(this.sumGradient[this.nodeBeingSplit] - leftGradient, this.sumHessian[this.nodeBeingSplit] - leftHessian)
    let lefts = 0
    for (let i = from; i < to; i++) {
      const p = order[i]
      const left = goesLeft[column[p]]
      score[p] += childValues[left]
      lefts += left
    }
    return from + lefts
  }

  private takeHistogram(): number {
    const free = this.freeHistograms.pop()
    if (free !== undefined) return free
    this.histograms.push(new Float64Array(this.featureCount * this.featureStride))
    return this.histograms.length - 1
  }

  /** Best split of a node by gain; false when none has positive gain within the leaf constraints. */
  private findSplit(node: number): boolean {
    const hist = this.histograms[this.histogramOf[node]]
    const { l2, minRowsPerLeaf } = this.settings
    const minHessian = MIN_HESSIAN_PER_LEAF
    const slot = this.slot
    const countAt = slot - 1
    const G = this.sumGradient[node]
    const H = this.sumHessian[node]
    const C = this.end[node] - this.begin[node]
    const parentScore = (G * G) / (H + l2)
    let bestGain = 0
    let bestFeature = -1
    let bestBin = -1
    let bestMissingLeft = 0
    let bestLG = 0
    let bestLH = 0
    let bestLC = 0
    for (let t = 0; t < this.width; t++) {
      const base = t * this.featureStride
      const bins = this.treeBins[t]
      const missing = base + MISSING_BIN * slot
      const mG = hist[missing]
      const mH = hist[missing + 1]
      const mC = hist[missing + countAt]
      const hasMissing = mC > 0
      let lG = 0
      let lH = 0
      let lC = 0
      for (let b = 0, s = base; b < bins; b++, s += slot) {
        lG += hist[s]
        lH += hist[s + 1]
        lC += hist[s + countAt]
        // Missing to the right: left = bins 0..b.
        let rC = C - lC
        if (lC >= minRowsPerLeaf && rC >= minRowsPerLeaf) {
          const rH = H - lH
          if (lH >= minHessian && rH >= minHessian) {
            const rG = G - lG
            const gain = 0.5 * ((lG * lG) / (lH + l2) + (rG * rG) / (rH + l2) - parentScore)
            if (gain > bestGain) {
              bestGain = gain
              bestFeature = t
              bestBin = b
              // Without missing rows, unseen missing values go to the larger child.
              bestMissingLeft = !hasMissing && lC > rC ? 1 : 0
              bestLG = lG
              bestLH = lH
              bestLC = lC
            }
          }
        }
        if (!hasMissing) continue
        // Missing to the left: left = bins 0..b plus the missing bin.
        const aC = lC + mC
        rC = C - aC
        if (aC >= minRowsPerLeaf && rC >= minRowsPerLeaf) {
          const aH = lH + mH
          const rH = H - aH
          if (aH >= minHessian && rH >= minHessian) {
            const aG = lG + mG
            const rG = G - aG
            const gain = 0.5 * ((aG * aG) / (aH + l2) + (rG * rG) / (rH + l2) - parentScore)
            if (gain > bestGain) {
              bestGain = gain
              bestFeature = t
              bestBin = b
              bestMissingLeft = 1
              bestLG = aG
              bestLH = aH
              bestLC = aC
            }
          }
        }
      }
    }
    if (bestFeature < 0) return false
    this.bestGain = bestGain
    this.bestFeature = bestFeature
    this.bestBin = bestBin
    this.bestMissingLeft = bestMissingLeft
    this.bestLeftGradient = bestLG
    this.bestLeftHessian = bestLH
    this.bestLeftCount = bestLC
    return true
  }

  /** Applies the best split found for `node`: partitions its rows, creates children and their histograms. */
  private split(node: number, childrenAreLeaves: boolean): void {
    const t = this.bestFeature
    this.nodeBeingSplit = node
    this.feature[node] = t
    this.splitBin[node] = this.bestBin
    this.missingLeft[node] = this.bestMissingLeft
    this.gain[node] = this.bestGain
    const from = this.begin[node]
    const to = this.end[node]
    const goesLeft = this.goesLeft
    goesLeft.fill(1, 0, this.bestBin + 1)
    goesLeft.fill(0, this.bestBin + 1, MISSING_BIN)
    goesLeft[MISSING_BIN] = this.bestMissingLeft
    const column = this.columnCodes[this.treeFeatures[t]]
    const middle = childrenAreLeaves
      ? this.scoreLastLevel(from, to, column)
      : partition(this.order, this.scratch, this.scratchRights, from, to, column, goesLeft)
    if (middle - from !== this.bestLeftCount) {
      throw new InternalError('fitBoosted: the partition disagrees with the histogram')
    }
    const l = this.nodeCount
    const r = l + 1
    this.nodeCount += 2
    this.left[node] = l
    this.right[node] = r
    this.begin[l] = from
    this.end[l] = middle
    this.begin[r] = middle
    this.end[r] = to
    this.sumGradient[l] = this.bestLeftGradient
    this.sumHessian[l] = this.bestLeftHessian
    this.sumGradient[r] = this.sumGradient[node] - this.bestLeftGradient
    this.sumHessian[r] = this.sumHessian[node] - this.bestLeftHessian
    this.histogramOf[l] = -1
    this.histogramOf[r] = -1
    if (childrenAreLeaves) {
      // Scored already: addToScores leaves these two out.
      this.end[l] = from
      this.begin[r] = to
      return
    }
    const leftNeeds = this.canSplit(l)
    const rightNeeds = this.canSplit(r)
    if (!leftNeeds && !rightNeeds) return
    // Build the smaller child's histogram; the larger one's is parent minus smaller, in the parent's buffer.
    const leftIsSmaller = middle - from <= to - middle
    const small = leftIsSmaller ? l : r
    const large = leftIsSmaller ? r : l
    const smallHist = this.takeHistogram()
    this.buildHistogram(this.histograms[smallHist], small)
    if (leftIsSmaller ? rightNeeds : leftNeeds) {
      const parentHist = this.histogramOf[node]
      this.subtractHistogram(this.histograms[parentHist], this.histograms[smallHist])
      this.histogramOf[large] = parentHist
      this.histogramOf[node] = -1
    }
    if (leftIsSmaller ? leftNeeds : rightNeeds) this.histogramOf[small] = smallHist
    else this.freeHistograms.push(smallHist)
  }

  /**
   * A node's histogram. The root of a tree grown on every row reads the codes column by column in
   * row order, four columns a pass (sequential, four features' histograms hot in cache at a time),
   * and copies the fixed row counts; every other node walks its rows once and adds each to every
   * feature (row-major codes).
   */
  private buildHistogram(hist: Float64Array, node: number): void {
    hist.fill(0, 0, this.width * this.featureStride)
    const from = this.begin[node]
    const to = this.end[node]
    const { rowCodes, featureCount, treeFeatures, width, order, gradient, hessian } = this
    if (from === 0 && to === order.length) {
      this.buildFullHistogram(hist)
      return
    }
    if (this.isUnitHessian) {
      if (width === featureCount) accumulateUnitHessian(hist, rowCodes, width, order, from, to, gradient)
      else accumulateUnitHessianSubset(hist, rowCodes, featureCount, treeFeatures, width, order, from, to, gradient)
    } else if (width === featureCount) accumulate(hist, rowCodes, width, order, from, to, gradient, hessian)
    else accumulateSubset(hist, rowCodes, featureCount, treeFeatures, width, order, from, to, gradient, hessian)
  }

  /** The histogram of every row: order is 0..n-1, so columns are read in order. */
  private buildFullHistogram(hist: Float64Array): void {
    const { slot, featureStride, treeFeatures, width, columnCodes, gradient, hessian, allRowCounts } = this
    const countAt = slot - 1
    let t = 0
    for (; t + 3 < width; t += 4) {
      const c0 = columnCodes[treeFeatures[t]]
      const c1 = columnCodes[treeFeatures[t + 1]]
      const c2 = columnCodes[treeFeatures[t + 2]]
      const c3 = columnCodes[treeFeatures[t + 3]]
      const base = t * featureStride
      if (this.isUnitHessian) accumulateFourColumnsUnitHessian(hist, base, featureStride, c0, c1, c2, c3, gradient)
      else accumulateFourColumns(hist, base, featureStride, c0, c1, c2, c3, gradient, hessian)
    }
    for (; t < width; t++) {
      const base = t * featureStride
      if (this.isUnitHessian) accumulateColumnUnitHessian(hist, base, columnCodes[treeFeatures[t]], gradient)
      else accumulateColumn(hist, base, columnCodes[treeFeatures[t]], gradient, hessian)
    }
    for (let t = 0; t < width; t++) {
      const base = t * featureStride
      const counts = treeFeatures[t] * SLOTS_PER_FEATURE
      const bins = this.treeBins[t]
      for (let b = 0; b < bins; b++) hist[base + b * slot + countAt] = allRowCounts[counts + b]
      hist[base + MISSING_BIN * slot + countAt] = allRowCounts[counts + MISSING_BIN]
    }
  }

  private subtractHistogram(into: Float64Array, minus: Float64Array): void {
    const slot = this.slot
    for (let t = 0; t < this.width; t++) {
      const base = t * this.featureStride
      const stop = base + this.treeBins[t] * slot
      for (let s = base; s < stop; s++) into[s] -= minus[s]
      const missing = base + MISSING_BIN * slot
      for (let s = missing; s < missing + slot; s++) into[s] -= minus[s]
    }
  }

  /** Adds this tree's leaf values to the training scores of every position (sampled or not). */
  addToScores(score: Float64Array, rowCount: number): void {
    const { order, feature, value, begin, end } = this
    for (let node = 0; node < this.nodeCount; node++) {
      if (feature[node] >= 0) continue
      const v = value[node]
      for (let i = begin[node]; i < end[node]; i++) score[order[i]] += v
    }
    if (rowCount === score.length) return
    // Rows left out of this tree's sample walk the tree in bin space.
    const sampled = new Uint8Array(score.length)
    for (let i = 0; i < rowCount; i++) sampled[order[i]] = 1
    const { rowCodes, featureCount, treeFeatures, splitBin, missingLeft, left, right } = this
    for (let p = 0; p < score.length; p++) {
      if (sampled[p] === 1) continue
      let node = 0
      while (feature[node] >= 0) {
        const code = rowCodes[p * featureCount + treeFeatures[feature[node]]]
        const goLeft = code === MISSING_BIN ? missingLeft[node] === 1 : code <= splitBin[node]
        node = goLeft ? left[node] : right[node]
      }
      score[p] += value[node]
    }
  }

  addSplitStatistics(gainByFeature: Float64Array, splitsByFeature: Int32Array): void {
    for (let node = 0; node < this.nodeCount; node++) {
      const t = this.feature[node]
      if (t < 0) continue
      gainByFeature[this.treeFeatures[t]] += this.gain[node]
      splitsByFeature[this.treeFeatures[t]]++
    }
  }

  /** The grown tree with raw thresholds; feature indices are the fit-local (model) indices. */
  toTree(upperEdges: readonly Float64Array[]): Tree {
    const m = this.nodeCount
    const tree = {
      feature: new Int32Array(m).fill(-1),
      threshold: new Float64Array(m),
      left: new Int32Array(m).fill(-1),
      right: new Int32Array(m).fill(-1),
      missingGoesLeft: new Uint8Array(m),
      value: new Float64Array(m),
    }
    for (let node = 0; node < m; node++) {
      const t = this.feature[node]
      if (t < 0) {
        tree.value[node] = this.value[node]
        continue
      }
      const k = this.treeFeatures[t]
      tree.feature[node] = k
      tree.threshold[node] = upperEdges[k][this.splitBin[node]]
      tree.left[node] = this.left[node]
      tree.right[node] = this.right[node]
      tree.missingGoesLeft[node] = this.missingLeft[node]
    }
    return tree
  }
}

/*
 * The node histogram loops take a node's rows several at a time (four, or eight when there is no
 * hessian to add): the rows' additions to one feature's histogram are independent unless two rows
 * share a bin, so the processor overlaps them instead of finishing one row's 30 features before the
 * next row's. Within a bin the additions still happen in row order, so the sums are bit-identical to
 * the one-row loop. The remainder goes one row at a time.
 */

/** The hot loop: adds (g, h, 1) of each of a node's rows to every feature's histogram. */
function accumulate(
  hist: Float64Array,
  codes: Uint8Array,
  width: number,
  order: Int32Array,
  from: number,
  to: number,
  gradient: Float64Array,
  hessian: Float64Array,
): void {
  const stride = 3 * SLOTS_PER_FEATURE
  let i = from
  for (; i + 3 < to; i += 4) {
    const p0 = order[i]
    const p1 = order[i + 1]
    const p2 = order[i + 2]
    const p3 = order[i + 3]
    const g0 = gradient[p0]
    const g1 = gradient[p1]
    const g2 = gradient[p2]
    const g3 = gradient[p3]
    const h0 = hessian[p0]
    const h1 = hessian[p1]
    const h2 = hessian[p2]
    const h3 = hessian[p3]
    const r0 = p0 * width
    const r1 = p1 * width
    const r2 = p2 * width
    const r3 = p3 * width
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s0 = base + codes[r0 + t] * 3
      hist[s0] += g0
      hist[s0 + 1] += h0
      hist[s0 + 2] += 1
      const s1 = base + codes[r1 + t] * 3
      hist[s1] += g1
      hist[s1 + 1] += h1
      hist[s1 + 2] += 1
      const s2 = base + codes[r2 + t] * 3
      hist[s2] += g2
      hist[s2 + 1] += h2
      hist[s2 + 2] += 1
      const s3 = base + codes[r3 + t] * 3
      hist[s3] += g3
      hist[s3 + 1] += h3
      hist[s3 + 2] += 1
    }
  }
  for (; i < to; i++) {
    const p = order[i]
    const g = gradient[p]
    const h = hessian[p]
    const row = p * width
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + t] * 3
      hist[s] += g
      hist[s + 1] += h
      hist[s + 2] += 1
    }
  }
}

/**
 * accumulate for unit hessians: adds (g, 1) per row; the count doubles as the hessian sum. Eight rows
 * at a time: with one slot fewer per row than accumulate there are registers for them.
 */
function accumulateUnitHessian(
  hist: Float64Array,
  codes: Uint8Array,
  width: number,
  order: Int32Array,
  from: number,
  to: number,
  gradient: Float64Array,
): void {
  const stride = 2 * SLOTS_PER_FEATURE
  let i = from
  for (; i + 7 < to; i += 8) {
    const p0 = order[i]
    const p1 = order[i + 1]
    const p2 = order[i + 2]
    const p3 = order[i + 3]
    const p4 = order[i + 4]
    const p5 = order[i + 5]
    const p6 = order[i + 6]
    const p7 = order[i + 7]
    const g0 = gradient[p0]
    const g1 = gradient[p1]
    const g2 = gradient[p2]
    const g3 = gradient[p3]
    const g4 = gradient[p4]
    const g5 = gradient[p5]
    const g6 = gradient[p6]
    const g7 = gradient[p7]
    const r0 = p0 * width
    const r1 = p1 * width
    const r2 = p2 * width
    const r3 = p3 * width
    const r4 = p4 * width
    const r5 = p5 * width
    const r6 = p6 * width
    const r7 = p7 * width
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s0 = base + codes[r0 + t] * 2
      hist[s0] += g0
      hist[s0 + 1] += 1
      const s1 = base + codes[r1 + t] * 2
      hist[s1] += g1
      hist[s1 + 1] += 1
      const s2 = base + codes[r2 + t] * 2
      hist[s2] += g2
      hist[s2 + 1] += 1
      const s3 = base + codes[r3 + t] * 2
      hist[s3] += g3
      hist[s3 + 1] += 1
      const s4 = base + codes[r4 + t] * 2
      hist[s4] += g4
      hist[s4 + 1] += 1
      const s5 = base + codes[r5 + t] * 2
      hist[s5] += g5
      hist[s5 + 1] += 1
      const s6 = base + codes[r6 + t] * 2
      hist[s6] += g6
      hist[s6 + 1] += 1
      const s7 = base + codes[r7 + t] * 2
      hist[s7] += g7
      hist[s7 + 1] += 1
    }
  }
  for (; i < to; i++) {
    const p = order[i]
    const g = gradient[p]
    const row = p * width
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + t] * 2
      hist[s] += g
      hist[s + 1] += 1
    }
  }
}

/**
 * Stable partition of order[from..to) into left-goers then right-goers by one feature's column;
 * returns the boundary. Reads the column (a node's rows in ascending position order, so nearby bytes)
 * rather than the row-major codes (one cache line per row), and goes without a branch per row: every
 * row is written to both scratch lists and goesLeft[code] (1 or 0) says which cursor moves, since a
 * split of random-looking rows mispredicts a branch for up to half of them. The lists are copied back
 * after the loop: writing into `order` while reading it made the loop wait on its own stores.
 */
function partition(
  order: Int32Array,
  lefts: Int32Array,
  rights: Int32Array,
  from: number,
  to: number,
  column: Uint8Array,
  goesLeft: Uint8Array,
): number {
  let l = 0
  let r = 0
  for (let i = from; i < to; i++) {
    const p = order[i]
    const left = goesLeft[column[p]]
    lefts[l] = p
    rights[r] = p
    l += left
    r += 1 - left
  }
  order.set(lefts.subarray(0, l), from)
  order.set(rights.subarray(0, r), from + l)
  return from + l
}

/**
 * accumulate when the tree uses a subset of the fit's features: codes[p * featureCount + treeFeatures[t]].
 * Kept apart from accumulate on purpose: the extra treeFeatures load costs about 8% of a full fit
 * (npm run bench), so the full-width loops stay without it.
 */
function accumulateSubset(
  hist: Float64Array,
  codes: Uint8Array,
  featureCount: number,
  treeFeatures: Int32Array,
  width: number,
  order: Int32Array,
  from: number,
  to: number,
  gradient: Float64Array,
  hessian: Float64Array,
): void {
  const stride = 3 * SLOTS_PER_FEATURE
  let i = from
  for (; i + 3 < to; i += 4) {
    const p0 = order[i]
    const p1 = order[i + 1]
    const p2 = order[i + 2]
    const p3 = order[i + 3]
    const g0 = gradient[p0]
    const g1 = gradient[p1]
    const g2 = gradient[p2]
    const g3 = gradient[p3]
    const h0 = hessian[p0]
    const h1 = hessian[p1]
    const h2 = hessian[p2]
    const h3 = hessian[p3]
    const r0 = p0 * featureCount
    const r1 = p1 * featureCount
    const r2 = p2 * featureCount
    const r3 = p3 * featureCount
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const k = treeFeatures[t]
      const s0 = base + codes[r0 + k] * 3
      hist[s0] += g0
      hist[s0 + 1] += h0
      hist[s0 + 2] += 1
      const s1 = base + codes[r1 + k] * 3
      hist[s1] += g1
      hist[s1 + 1] += h1
      hist[s1 + 2] += 1
      const s2 = base + codes[r2 + k] * 3
      hist[s2] += g2
      hist[s2 + 1] += h2
      hist[s2 + 2] += 1
      const s3 = base + codes[r3 + k] * 3
      hist[s3] += g3
      hist[s3 + 1] += h3
      hist[s3 + 2] += 1
    }
  }
  for (; i < to; i++) {
    const p = order[i]
    const g = gradient[p]
    const h = hessian[p]
    const row = p * featureCount
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + treeFeatures[t]] * 3
      hist[s] += g
      hist[s + 1] += h
      hist[s + 2] += 1
    }
  }
}

/** accumulateUnitHessian when the tree uses a subset of the fit's features. */
function accumulateUnitHessianSubset(
  hist: Float64Array,
  codes: Uint8Array,
  featureCount: number,
  treeFeatures: Int32Array,
  width: number,
  order: Int32Array,
  from: number,
  to: number,
  gradient: Float64Array,
): void {
  const stride = 2 * SLOTS_PER_FEATURE
  let i = from
  for (; i + 7 < to; i += 8) {
    const p0 = order[i]
    const p1 = order[i + 1]
    const p2 = order[i + 2]
    const p3 = order[i + 3]
    const p4 = order[i + 4]
    const p5 = order[i + 5]
    const p6 = order[i + 6]
    const p7 = order[i + 7]
    const g0 = gradient[p0]
    const g1 = gradient[p1]
    const g2 = gradient[p2]
    const g3 = gradient[p3]
    const g4 = gradient[p4]
    const g5 = gradient[p5]
    const g6 = gradient[p6]
    const g7 = gradient[p7]
    const r0 = p0 * featureCount
    const r1 = p1 * featureCount
    const r2 = p2 * featureCount
    const r3 = p3 * featureCount
    const r4 = p4 * featureCount
    const r5 = p5 * featureCount
    const r6 = p6 * featureCount
    const r7 = p7 * featureCount
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const k = treeFeatures[t]
      const s0 = base + codes[r0 + k] * 2
      hist[s0] += g0
      hist[s0 + 1] += 1
      const s1 = base + codes[r1 + k] * 2
      hist[s1] += g1
      hist[s1 + 1] += 1
      const s2 = base + codes[r2 + k] * 2
      hist[s2] += g2
      hist[s2 + 1] += 1
      const s3 = base + codes[r3 + k] * 2
      hist[s3] += g3
      hist[s3 + 1] += 1
      const s4 = base + codes[r4 + k] * 2
      hist[s4] += g4
      hist[s4 + 1] += 1
      const s5 = base + codes[r5 + k] * 2
      hist[s5] += g5
      hist[s5 + 1] += 1
      const s6 = base + codes[r6 + k] * 2
      hist[s6] += g6
      hist[s6 + 1] += 1
      const s7 = base + codes[r7 + k] * 2
      hist[s7] += g7
      hist[s7 + 1] += 1
    }
  }
  for (; i < to; i++) {
    const p = order[i]
    const g = gradient[p]
    const row = p * featureCount
    for (let t = 0, base = 0; t < width; t++, base += stride) {
      const s = base + codes[row + treeFeatures[t]] * 2
      hist[s] += g
      hist[s + 1] += 1
    }
  }
}

/**
 * Four features' (g, h) sums over every row, reading their columns in order: each row's gradient is
 * loaded once for four histograms (16 KiB together, in the first-level cache) instead of once per
 * feature, and the four additions are independent. Counts are filled in by the caller.
 */
function accumulateFourColumns(
  hist: Float64Array,
  base: number,
  stride: number,
  c0: Uint8Array,
  c1: Uint8Array,
  c2: Uint8Array,
  c3: Uint8Array,
  gradient: Float64Array,
  hessian: Float64Array,
): void {
  const b1 = base + stride
  const b2 = b1 + stride
  const b3 = b2 + stride
  for (let p = 0; p < c0.length; p++) {
    const g = gradient[p]
    const h = hessian[p]
    const s0 = base + c0[p] * 3
    hist[s0] += g
    hist[s0 + 1] += h
    const s1 = b1 + c1[p] * 3
    hist[s1] += g
    hist[s1 + 1] += h
    const s2 = b2 + c2[p] * 3
    hist[s2] += g
    hist[s2 + 1] += h
    const s3 = b3 + c3[p] * 3
    hist[s3] += g
    hist[s3 + 1] += h
  }
}

/** accumulateFourColumns for unit hessians: gradient sums only. */
function accumulateFourColumnsUnitHessian(
  hist: Float64Array,
  base: number,
  stride: number,
  c0: Uint8Array,
  c1: Uint8Array,
  c2: Uint8Array,
  c3: Uint8Array,
  gradient: Float64Array,
): void {
  const b1 = base + stride
  const b2 = b1 + stride
  const b3 = b2 + stride
  for (let p = 0; p < c0.length; p++) {
    const g = gradient[p]
    hist[base + c0[p] * 2] += g
    hist[b1 + c1[p] * 2] += g
    hist[b2 + c2[p] * 2] += g
    hist[b3 + c3[p] * 2] += g
  }
}

/** One feature's (g, h) sums over every row, reading its column in order (the last features when fewer than four are left). */
function accumulateColumn(hist: Float64Array, base: number, column: Uint8Array, gradient: Float64Array, hessian: Float64Array): void {
  for (let p = 0; p < column.length; p++) {
    const s = base + column[p] * 3
    hist[s] += gradient[p]
    hist[s + 1] += hessian[p]
  }
}

/** One feature's gradient sums over every row, reading its column in order. */
function accumulateColumnUnitHessian(hist: Float64Array, base: number, column: Uint8Array, gradient: Float64Array): void {
  for (let p = 0; p < column.length; p++) hist[base + column[p] * 2] += gradient[p]
}
