import type { ModelEngine } from '../models/model.ts'
/**
 * GateReport: the product. One object, rendered as the pull-request comment (markdown), the
 * terminal text, the job summary, and written as is as JSON (`--json`). Versioned: consumers check
 * `schemaVersion`; any change to a field's meaning bumps it (docs/report-json.md documents it).
 */

export type Verdict = 'pass' | 'warn' | 'block' | 'error'
export type Severity = 'block' | 'warn' | 'info'

export type FindingKind =
  | 'leakage' // one feature dominates the model, or alone separates the holdout almost perfectly
  | 'rank-shift' // one feature's importance moved significantly and by enough positions
  | 'rank-agreement' // the two sides' rankings agree less than reseeded refits of the base agree
  | 'score-regression' // the holdout score got worse beyond tolerance and noise
  | 'holdout-rows' // the two sides are not scored on the same holdout rows
  | 'feature-set' // features added, removed or changed kind
  | 'floor-drop' // a feature above the floor on the base is indistinguishable from zero on the head
  | 'share-redistribution' // a strong feature added or removed moved the others' importance in proportion (their shifts, grouped)
  | 'unused-feature' // an added feature the candidate model does not use
  | 'policy-changed' // the pull request changes the policy file itself
  | 'noise-model' // how much noise the floor covers (loaded models cannot be reseeded)
  | 'run-error' // the run failed; verdict 'error'
  | 'sensitivity-shift' // how much predictions move with a feature changed between the sides beyond reseed noise
  | 'sensitivity-unlabeled' // on the unlabeled rows a feature moves predictions much more or less than on the holdout
  | 'gain-noise' // ranked high by the trees' gain, indistinguishable from zero on the holdout
  | 'slice-score' // a policy slice's holdout score got worse beyond reseed noise
  | 'slice-dominance' // inside a policy slice one feature carries the model
  | 'slice-top-features' // a policy slice's top feature is not among the overall top
  | 'slice-too-small' // a policy slice has too few holdout rows (or one class) to judge
  | 'group-carried' // a feature looks unimportant alone while its correlated group matters

/** Evidence values are plain numbers, strings, booleans or null, so the JSON stays flat and diffable. */
export type Evidence = Readonly<Record<string, number | string | boolean | null>>

export interface Finding {
  readonly kind: FindingKind
  readonly severity: Severity
  /** The feature (or group) the finding is about, when it is about one. */
  readonly feature?: string
  /** One sentence, plain text, no markdown. */
  readonly title: string
  /** Longer plain-text explanation with the numbers that decided it. */
  readonly message: string
  readonly evidence: Evidence
}

/** One side's statistics for one feature or group. Importance is "how much worse the metric gets". */
export interface SideImportance {
  /** Mean importance over refits (each refit's value is the mean over its draws). */
  readonly mean: number
  /** 95% interval for `mean`: refit and draw variance (t, refits-1 df), plus the holdout rows' SE in quadrature where the metric is a mean over rows. */
  readonly lower: number
  readonly upper: number
  /** SD across refits of the per-refit means: the training-noise floor. */
  readonly refitSd: number
  /** Pooled SD of single draws within a refit. */
  readonly drawSd: number
  /** 1-based rank by mean importance among this side's features (groups ranked separately). */
  readonly rank: number
  /** Share of this side's total positive importance (features only; groups: share of the same total). */
  readonly share: number
  /** The interval's lower bound is above zero. */
  readonly isAboveFloor: boolean
  /** Per refit, the mean over draws. */
  readonly perRefit: readonly number[]
  /** A one-feature built-in model's holdout AUC (binary) or R² (regression), when it was computed. */
  readonly singleFeatureScore?: number
  /**
   * Drop-column importance (LOCO), when this feature was refitted without: the holdout loss without
   * it minus the loss with it, over matched refits, in loss units (lossOfScore), with its interval.
   */
  readonly dropColumn?: {
    readonly loss: number
    readonly lower: number
    readonly upper: number
    readonly pValue: number
    readonly isAboveNoise: boolean
    readonly perRefit: readonly number[]
  }
}

export interface FeatureRow {
  readonly name: string
  readonly isGroup: boolean
  /** Groups only: member columns. */
  readonly members?: readonly string[]
  readonly presence: 'both' | 'added' | 'removed'
  readonly kind?: 'numeric' | 'categorical' | 'group'
  readonly base?: SideImportance
  readonly head?: SideImportance
  /** Features on both sides: the rank-shift test. */
  readonly shift?: {
    readonly meanDifference: number
    readonly welchT: number
    readonly welchDf: number
    readonly pValue: number
    readonly adjustedPValue: number
    readonly isSignificant: boolean
    /** head rank minus base rank among features above the floor on either side; null when not compared. */
    readonly positionsMoved: number | null
  }
}

export interface SideSummary {
  readonly side: 'base' | 'head'
  /** The git ref or description the user gave ("working tree" for an uncommitted head). */
  readonly ref: string
  readonly commit: string | null
  readonly trainRows: number
  readonly holdoutRows: number
  /** Holdout rows actually used for importance (a cap may sample them). */
  readonly evaluationRows: number
  readonly referenceRows: number
  readonly features: readonly { readonly name: string; readonly kind: 'numeric' | 'categorical' }[]
  /**
   * engine: what computed the model's predictions: plumbline's tree evaluator (built-in boosted
   * trees, and ONNX tree ensembles it reads, which get the permutation fast path), its linear
   * evaluator, or onnxruntime. Optional: reports written before it existed lack it.
   */
  readonly model: { readonly kind: string; readonly description: string; readonly engine?: ModelEngine }
  /** Holdout metric per refit, in refit order. */
  readonly scores: readonly number[]
  readonly scoreMean: number
  readonly scoreSd: number
  /** The derived seed of each refit, so any single refit can be rerun alone. */
  readonly refitSeeds: readonly number[]
  /** 'refits-and-draws' when models were refitted; 'draws-only' for a loaded model. */
  readonly noiseCovers: 'refits-and-draws' | 'draws-only'
  /**
   * Present only when a row cap sampled this side's rows (`data.max_train_rows`,
   * `data.max_holdout_rows`): each sampled table's rows as read, rows kept, and the seed of the
   * sample. trainRows and holdoutRows above are then the kept rows.
   */
  readonly rowSampling?: { readonly train?: RowSample; readonly holdout?: RowSample }
}

/** A simple random sample without replacement of a table's rows, drawn with `seed`. */
export interface RowSample {
  readonly rows: number
  readonly kept: number
  readonly seed: number
}

export interface RankAgreement {
  readonly kendallTau: number
  readonly rankBiasedOverlap: number
  readonly persistence: number
  /** The same statistics between pairs of base refits: the reseed null. */
  readonly nullKendallTau: readonly number[]
  readonly nullRankBiasedOverlap: readonly number[]
  readonly kendallTauThreshold: number
  readonly rankBiasedOverlapThreshold: number
  /** Features compared (above the floor on either side, present on both). */
  readonly featuresCompared: number
}

/** Prediction sensitivity of one feature or group on one side and one set of rows, over refits. */
export interface SensitivityValue {
  /** Mean over refits of the mean absolute change of the output (binary: of the probability; multiclass: half the sum over classes). */
  readonly mean: number
  /** SD across refits of the per-refit values (NaN for one refit). */
  readonly refitSd: number
  /** Classifiers: mean share of rows whose decision flips (binary: at the threshold; multiclass: the most probable class); null for regression. */
  readonly flipShare: number | null
  /** Per refit, the mean over draws. */
  readonly perRefit: readonly number[]
}

export interface SensitivitySide {
  readonly holdout: SensitivityValue
  /** On `data.unlabeled`, when the policy names it. */
  readonly unlabeled?: SensitivityValue
}

export interface SensitivityRow {
  readonly name: string
  readonly isGroup: boolean
  readonly base?: SensitivitySide
  readonly head?: SensitivitySide
  /** Both sides: Welch's test of the holdout values, Benjamini–Hochberg over the units compared. */
  readonly change?: { readonly pValue: number; readonly adjustedPValue: number; readonly isSignificant: boolean }
}

/** Prediction sensitivity (Datta, Sen & Zick 2016, unary influence), measured without labels. */
export interface SensitivityReport {
  /** Binary: the decision threshold on the probability (0.5); null for regression and multiclass. */
  readonly threshold: number | null
  /**
   * Multiclass only: a decision flips when the most probable class changes, and "moves predictions"
   * is half the sum over classes of each probability's absolute change (total variation distance).
   */
  readonly decision?: 'most-probable-class'
  /** Rows of `data.unlabeled` measured per side (0 without it). */
  readonly unlabeledRows: { readonly base: number; readonly head: number }
  /** Head's holdout value first. */
  readonly features: readonly SensitivityRow[]
}

export interface GainValue {
  /** Mean over refits of the summed split gain (in-sample loss reduction). */
  readonly gain: number
  /** Mean over refits of the number of splits. */
  readonly splits: number
  /** Share of the side's total gain. */
  readonly share: number
  /** 1-based rank by gain among the side's features. */
  readonly rank: number
}

/** The built-in gradient boosting's gain and split counts, beside permutation importance. */
export interface GainReport {
  readonly caution: string
  /** Head's gain first. */
  readonly features: readonly { readonly name: string; readonly base?: GainValue; readonly head?: GainValue }[]
}

export const gainCaution =
  'Gain is measured on the training rows (in-sample) and favours continuous and high-cardinality ' +
  'features (Strobl, Boulesteix, Zeileis & Hothorn 2007); permutation importance on the holdout is the measure to judge by.'

/** One side of a policy slice: its rows, per-refit scores and top features by importance on them. */
export interface SliceSideSummary {
  readonly rows: number
  readonly scores: readonly number[]
  readonly scoreMean: number
  /** Up to five features by mean importance on the slice's rows. */
  readonly top: readonly { readonly name: string; readonly mean: number; readonly share: number; readonly isAboveFloor: boolean }[]
}

export interface SliceRow {
  readonly name: string
  /** The filter in words. */
  readonly definition: string
  /** measured: scored and judged; too-small / one-class: not judged; the base may lack a column the head adds. */
  readonly status: 'measured' | 'too-small' | 'one-class'
  /** Holdout rows the filter keeps on each side (null: the base lacks a column the filter names). */
  readonly rows: { readonly base: number | null; readonly head: number }
  readonly base?: SliceSideSummary
  readonly head?: SliceSideSummary
  /** Both sides measured with two refits or more: the one-sided Welch test of the slice's score. */
  readonly scoreChange?: { readonly worsening: number; readonly pValue: number; readonly adjustedPValue: number }
}

export interface GateReport {
  readonly schemaVersion: 1
  readonly tool: { readonly name: 'plumbline'; readonly version: string }
  readonly verdict: Verdict
  /** One sentence: the verdict and its main reason. Plain text. */
  readonly headline: string
  /** Sorted: block, then warn, then info. */
  readonly findings: readonly Finding[]
  /** Sorted by head importance (removed features after, by base importance). */
  readonly features: readonly FeatureRow[]
  readonly featureSet: {
    readonly added: readonly string[]
    readonly removed: readonly string[]
    readonly kindChanged: readonly { readonly name: string; readonly base: string; readonly head: string }[]
  }
  readonly agreement: RankAgreement | null
  readonly sides: { readonly base: SideSummary; readonly head: SideSummary } | null
  readonly settings: {
    readonly task: 'binary' | 'regression' | 'multiclass'
    /** Multiclass only: the class labels in the order of the models' probability columns (class 0 first). */
    readonly classes?: readonly string[]
    readonly target: string
    readonly metric: string
    readonly higherIsBetter: boolean
    readonly draws: number
    readonly refits: number
    readonly seed: number
    readonly policySource: string
    /** The head's policy governs both sides. */
    readonly policyFrom: 'head'
    readonly checks: Readonly<Record<string, Evidence>>
  }
  /** Wall-clock seconds per stage, measured by the adapter; not part of the deterministic content. */
  readonly timings: Readonly<Record<string, number>>
  /**
   * Only with a unit cache (--cache): the work units read from it, those measured and written to it,
   * and those that cannot be cached (a training command or model file in an uncommitted working
   * tree). Like timings, not part of the deterministic content: a report from the cache equals one
   * measured afresh apart from this field and timings.
   */
  readonly cache?: { readonly reused: readonly string[]; readonly measured: readonly string[]; readonly uncacheable: readonly string[] }
  /** Prediction sensitivity per feature; absent when checks.sensitivity is off. */
  readonly sensitivity?: SensitivityReport
  /** Built-in gradient boosting only. */
  readonly gain?: GainReport
  /** Feature groups permuted jointly: the policy's and the automatic ones (|Spearman| at or above the threshold). */
  readonly groups?: readonly { readonly name: string; readonly members: readonly string[]; readonly automatic: boolean; readonly weakestLink: number | null }[]
  /** Policy slices, in policy order; absent without slices or with checks.slices off. */
  readonly slices?: readonly SliceRow[]
  /** Always present: a pass is not proof of the absence of leakage. */
  readonly caution: string
}

export const reportCaution =
  'A pass is not proof that the model is free of leakage or fit for use: plumbline only sees what ' +
  'the data on both sides can show, and a weak leak looks like a weak real signal. Review of the ' +
  "feature change stays with people and the team's own policies."
