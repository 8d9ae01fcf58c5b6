/**
 * What the adapters hand to runGate: the policy, and for each side the data and how its model comes
 * about. Types only, so that stages, report assembly and adapters can share them without importing
 * run-gate.ts.
 */
import type { GateConfig } from '../config.ts'
import type { Dataset, FeatureMatrix, Task } from '../data/dataset.ts'
import type { MeasureSideInputs, MeasureSideOptions, SideMeasurement } from '../measure-side.ts'
import type { BuiltinLearnerSettings } from '../models/builtin-fit.ts'
import type { Fit, Model } from '../models/model.ts'

/**
 * How a side's model comes about:
 * - builtin: the policy's built-in learner, refitted R times; the core builds the fit from the policy.
 * - command: the repository's training command, run once per refit by the adapter behind `fit`.
 * - loaded: an ONNX model read from the checkout; it cannot be reseeded, so there is one "refit".
 */
export type SideModel =
  | { readonly kind: 'builtin' }
  | { readonly kind: 'command'; readonly fit: Fit }
  | { readonly kind: 'loaded'; readonly model: Model }

export interface SideInputs {
  readonly ref: string
  readonly commit: string | null
  readonly train: Dataset
  readonly holdout: Dataset
  readonly reference: FeatureMatrix
  /** Rows without labels (`data.unlabeled`), for prediction sensitivity. */
  readonly unlabeled?: FeatureMatrix
  readonly model: SideModel
}

/** One side's measurement request, as measureSide takes it; `builtin` says how a worker rebuilds the fit. */
export interface MeasureJob {
  readonly inputs: MeasureSideInputs
  readonly options: MeasureSideOptions
  readonly builtin?: { readonly task: Task; readonly settings: BuiltinLearnerSettings }
}

/** Measures both sides; the default does one after the other in this thread. */
export type MeasureSides = (jobs: readonly [MeasureJob, MeasureJob]) => Promise<readonly [SideMeasurement, SideMeasurement]>

export type GateProgress =
  | { readonly stage: 'refit'; readonly side: 'base' | 'head'; readonly refit: number; readonly of: number }
  | { readonly stage: 'single-feature'; readonly side: 'base' | 'head'; readonly features: number }
  | { readonly stage: 'checks' }

export interface GateInputs {
  readonly config: GateConfig
  readonly policySource: string
  /** The pull request changes the policy file (the head's policy governs both sides). */
  readonly policyChanged: boolean
  readonly base: SideInputs
  readonly head: SideInputs
  readonly toolVersion: string
  readonly onProgress?: (event: GateProgress) => void
  /** How the two sides are measured (the CLI runs them in worker threads); default: in turn, here. */
  readonly measureSides?: MeasureSides
  /** Seconds on some monotonic clock, for timings only; omitted, timings are empty. */
  readonly now?: () => number
}
