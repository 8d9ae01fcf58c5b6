/**
 * The policy (`plumbline.yml`) as the rest of the gate sees it: `GateConfig`, fully resolved, so no
 * code downstream tests a setting for undefined. Only things that are absent by nature are optional
 * (`prepare`, `data.unlabeled`, `data.holdout.by`, `model.features`, `model.positiveClass`).
 *
 * Types only. The schema of the YAML document and its transform to this type are in
 * src/core/policy/policy-schema.ts, the defaults in src/core/policy/policy-defaults.ts; each check's
 * settings are the options type that the check itself declares (src/core/checks/), so a setting is
 * declared once. docs/policy.md is the reference for users.
 */
import type { CheckAction } from './checks/check-action.ts'
import type { LeakageOptions } from './checks/leakage.ts'
import type { RankAgreementOptions } from './checks/rank-agreement.ts'
import type { RankShiftOptions } from './checks/rank-shift.ts'
import type { ScoreRegressionOptions } from './checks/score-regression.ts'
import type { ColumnRole, Task } from './data/dataset.ts'
import type { MetricName } from './metrics/metric.ts'
import type { BoostingSettings } from './models/gbt/fit-boosted.ts'

export type { CheckAction }
// ---------------------------------------------------------------------------------------------
// The resolved configuration

/** A role the policy may declare for a column (the target is named by `target`, not by role). */
export type DeclaredColumnRole = Exclude<ColumnRole, 'target'>

export type Learner = 'gradient-boosting' | 'linear'

export interface GateConfig {
  readonly version: 1
  readonly task: Task
  /** The column to predict. */
  readonly target: string
  /** uint32; every random choice of the run derives from it (deriveSeed). */
  readonly seed: number
  readonly data: DataConfig
  /** A command run in each side's checkout before the data is read; absent when the policy has none. */
  readonly prepare?: PrepareConfig
  readonly model: ModelConfig
  readonly importance: ImportanceConfig
  readonly checks: ChecksConfig
  /**
   * The same checks section as the policy spells it (its own key names, defaults filled in), so the
   * report's settings table names each key as plumbline.yml does without translating names back.
   */
  readonly checksAsWritten: ChecksAsWritten
  /** Named subsets of the holdout rows, each scored and measured on its own (policy `slices`). */
  readonly slices: readonly SliceConfig[]
  readonly report: ReportConfig
}

/** Each check's settings under its policy key, with the policy's key names. */
export type ChecksAsWritten = Readonly<Record<string, Readonly<Record<string, number | string | readonly string[]>>>>

/**
 * A row filter, as data (no formula language): one comparison of a column, or all / any of several
 * filters. `equals` and `in` hold text as written (a number for a numeric column); `between` is
 * [low, high): low included, high excluded.
 */
export type SliceFilter =
  | {
      readonly column: string
      readonly equals?: string
      readonly in?: readonly string[]
      readonly atLeast?: number
      readonly below?: number
      readonly between?: readonly [number, number]
      readonly isMissing?: boolean
    }
  | { readonly allOf: readonly SliceFilter[] }
  | { readonly anyOf: readonly SliceFilter[] }

export interface SliceConfig {
  readonly name: string
  readonly where: SliceFilter
}

/** Per-slice checks (policy `checks.slices`). */
export interface SlicesCheckConfig {
  readonly action: CheckAction
  /** Slices with fewer holdout rows on the head side are reported as too small and not judged. */
  readonly minRows: number
}

export interface DataConfig {
  /** Path relative to the repository root, as written. */
  readonly train: string
  readonly holdout: HoldoutConfig
  /** Where permutation draws come from. */
  readonly reference: ReferenceConfig
  /** Rows without the target, for prediction sensitivity. */
  readonly unlabeled?: string
  /** Declared roles by column name (null-prototype object, so any column name is a safe lookup). */
  readonly columns: Readonly<Record<string, DeclaredColumnRole>>
  /** Above this many training rows (after a split), the built-in refits train on a seeded sample. */
  readonly maxTrainRows: number
  /** Above this many holdout rows, both sides are scored on the same seeded sample of them. */
  readonly maxHoldoutRows: number
}

export type HoldoutConfig =
  | { readonly kind: 'file'; readonly path: string }
  /** Carve the holdout out of train; `by` hashes that column so both sides hold out the same rows. */
  | { readonly kind: 'split'; readonly fraction: number; readonly by?: string }

export type ReferenceConfig =
  | { readonly kind: 'train' }
  | { readonly kind: 'holdout' }
  | { readonly kind: 'file'; readonly path: string }

export interface PrepareConfig {
  readonly command: string
  readonly timeoutSeconds: number
}

/** Settings of the built-in learners (policy `model.builtin`). For `linear` only `l2` (the ridge / logistic penalty) is used. */
export interface BuiltinSettings extends BoostingSettings {
  readonly maxBins: number
}

export type ModelConfig =
  | ({ readonly kind: 'builtin'; readonly learner: Learner } & BuiltinSettings)
  | {
      readonly kind: 'onnx'
      /** Path or glob, read from each side's checkout. */
      readonly path: string
      /** Column order of a single [N, F] input, for models without input metadata. */
      readonly features?: readonly string[]
      /**
       * Binary only. Text is a class label; a whole number (written as digits) is a label when the
       * model's labels are whole numbers, otherwise the probability column.
       */
      readonly positiveClass?: string | number
    }
  | {
      readonly kind: 'train'
      /** Shell command that writes an ONNX model to $PLUMBLINE_OUTPUT. */
      readonly command: string
      readonly timeoutSeconds: number
      /** How many training commands may run at once. */
      readonly parallel: number
    }

export interface ImportanceConfig {
  readonly metric: MetricName
  /** K draws per feature per refit. */
  readonly draws: number
  /** R reseeded refits per side. */
  readonly refits: number
  /** Cap on the reference rows sampled for draws. */
  readonly referenceRows: number
  /** Cap on the holdout rows used for importance (the score uses every row). */
  readonly evaluationRows: number
  /** Drop-column (LOCO) refits for the top this many features of each side by permutation importance (plus every added or changed feature on the head). */
  readonly dropColumnTop: number
  /**
   * Groups per side refitted without all their members at once (drop-column), by grouped permutation
   * importance above the floor, besides every group holding an added or changed feature; the members
   * of such a group above the floor are then refitted without one by one.
   */
  readonly dropGroupTop: number
  /** Group name -> member columns, permuted jointly (null-prototype object). */
  readonly groups: Readonly<Record<string, readonly string[]>>
  /** Automatic groups: numeric features linked by |Spearman rho| at or above this (single linkage). */
  readonly groupThreshold: number
}

/** The policy's settings of each check are the check's own options, less what the gate fills in. */
export type LeakageCheckConfig = Omit<LeakageOptions, 'task'>

export type RankShiftCheckConfig = Omit<RankShiftOptions, 'minRelativeChange'> & Pick<RankAgreementOptions, 'agreementPercentile'>

export type ScoreCheckConfig = Omit<ScoreRegressionOptions, 'metric' | 'higherIsBetter' | 'blockAtSds'>

/** Prediction sensitivity (policy `checks.sensitivity`): changes between the sides, and unlabeled rows against the holdout. */
export interface SensitivityCheckConfig {
  readonly action: CheckAction
  /** Benjamini–Hochberg level over features for "this feature's sensitivity changed". */
  readonly falseDiscoveryRate: number
  /** A significant change counts when it is at least this share of the larger side's value. */
  readonly minRelativeChange: number
  /** Unlabeled rows against the holdout: flagged at this ratio (or its inverse) and beyond noise. */
  readonly unlabeledRatio: number
  /** Only features whose sensitivity is at least this share of the side's largest one are judged. */
  readonly minShare: number
}

/** Built-in gain importance (policy `checks.gain`): a feature the trees split on much that does not help on the holdout. */
export interface GainCheckConfig {
  readonly action: CheckAction
  /** Judged when among this many top features by gain. */
  readonly topRanks: number
  /** ... and with at least this share of the model's total gain. */
  readonly minGainShare: number
  /** ... and with at least this many distinct values in the training rows (high cardinality). */
  readonly minDistinct: number
}

/** Correlated groups (policy `checks.correlated_groups`): a member that looks unimportant alone while its group matters. */
export interface GroupsCheckConfig {
  /** off also skips the automatic groups. */
  readonly action: 'warn' | 'info' | 'off'
}

export interface ChecksConfig {
  readonly correlatedGroups: GroupsCheckConfig
  readonly sensitivity: SensitivityCheckConfig
  readonly gain: GainCheckConfig
  readonly slices: SlicesCheckConfig
  readonly leakage: LeakageCheckConfig
  readonly rankShift: RankShiftCheckConfig
  readonly score: ScoreCheckConfig
  /** The holdout rows differ between the two sides. */
  readonly holdoutRows: { readonly action: CheckAction }
}

export interface ReportConfig {
  /** Feature-table rows in the comment before "N more rows". */
  readonly maxTableRows: number
}

