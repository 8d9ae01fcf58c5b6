import type { Task } from '../data/dataset.ts'
import type { Finding, Severity } from '../report/report.ts'
import { mean, positiveShare, rankFeatures, type SideResult } from './side-result.ts'

import type { CheckAction } from './check-action.ts'
import { formatNumber, formatPercent as pct, formatRatio } from '../report/format-number.ts'
import { liftEvidence, type LiftEvidence } from './lift-evidence.ts'
import type { SliceSeparation } from '../importance/single-feature-separation.ts'
import { pooledStandardDeviation } from '../statistics/pooled-standard-deviation.ts'
import { sampleStandardDeviation } from '../statistics/sample-standard-deviation.ts'

export interface LeakageOptions {
  readonly action: CheckAction
  /** Multiclass is judged as binary is, on one-vs-rest AUC (a one-feature model's best class). */
  readonly task: Task
  /** The policy metric's name, for the words of the lift rule. */
  readonly metricName?: string
  /** The top feature's share of total positive importance at or above which it dominates. */
  readonly dominanceShare: number
  /** The top feature's importance over the runner-up's at or above which it dominates. */
  readonly runnerUpRatio: number
  /** A one-feature model's holdout AUC / R² at or above which the feature alone separates the holdout. */
  readonly singleFeaturePower: number
  /** A one-feature model's gain over a trivial predictor, relative to the full model's gain. */
  readonly relativePower: number
  /** Lift share (drop-column loss of a new or changed feature over the base model's remaining loss) from which it warns. */
  readonly liftWarn: number
  /** Lift share from which the lift rule takes the policy action. */
  readonly liftBlock: number
  /**
   * A new or changed feature the model needs (drop-column loss above noise) whose one-feature model
   * reaches this AUC / R² within one slice is warned about, named, even below singleFeaturePower.
   */
  readonly sliceWarnPower: number
  /** Columns a person reviewed as known at prediction time: lift and dominance blocks on them become warnings. */
  readonly reviewedColumns: readonly string[]
}

export interface LeakageContext {
  readonly base: SideResult
  readonly head: SideResult
  /** Features new in the pull request. */
  readonly added: ReadonlySet<string>
  /** Features on both sides whose training values differ. */
  readonly changed: ReadonlySet<string>
}

/**
 * A leak must not pass because the holdout cannot show it: when the head's full model or a one-feature
 * model has no defined AUC / R² on the holdout (one class only, or a constant target), the check
 * could not be evaluated, and that is itself a finding with the policy's action (block by default),
 * never silence.
 */
function unevaluated(head: SideResult, options: LeakageOptions, metricName: string): Finding[] {
  if (options.action === 'off') return []
  const undefinedFor = Object.entries(head.singleFeatureSeparation)
    .filter(([, value]) => !Number.isFinite(value))
    .map(([name]) => name)
    .sort()
  const fullUndefined = head.separation.length > 0 && !head.separation.some((value) => Number.isFinite(value))
  if (undefinedFor.length === 0 && !fullUndefined) return []
  const why =
    options.task === 'binary'
      ? 'the holdout holds one class only, so AUC is undefined'
      : options.task === 'multiclass'
        ? 'the holdout lacks a class, so the one-vs-rest AUC is undefined'
        : 'the holdout target is constant, so R² is undefined'
  const shown = undefinedFor.slice(0, 5).join(', ') + (undefinedFor.length > 5 ? ` and ${undefinedFor.length - 5} more` : '')
  return [
    {
      kind: 'leakage',
      severity: options.action,
      title: `The leakage check could not be evaluated on the head side: ${why}.`,
      message:
        `No holdout ${metricName} could be computed for ${fullUndefined ? 'the full model' : ''}${fullUndefined && undefinedFor.length ? ' and ' : ''}` +
        `${undefinedFor.length ? `the one-feature models of ${shown}` : ''}. A feature that encodes the label cannot be told from a harmless one ` +
        `on this holdout, so this check neither passes nor clears the pull request. Give the holdout rows of both classes ` +
        `(or varied target values), then rerun; or set checks.leakage.action to warn if you accept not checking for leaks.`,
      evidence: { unevaluatedFeatures: undefinedFor.length, fullModelUndefined: fullUndefined },
    },
  ]
}

/**
 * Leakage-like dominance (common practice, no single source: a feature that alone predicts the
 * label almost perfectly, or that takes most of the model's reliance while alone matching the whole
 * model, is the classic sign of a label leak; Kaufman, Rosset & Perlich 2012, ACM TKDD 6(4), give the
 * formal view: the feature would not be available at prediction time).
 *
 * Two rules, both weighing what the pull request changed:
 * 1. Separation: a one-feature built-in model reaches AUC / R² >= singleFeaturePower on the holdout.
 *    New or changed features, or ones that crossed the line in this pull request: the policy action.
 *    Already that strong on the base side and unchanged: a warning, since this pull request did not
 *    introduce it.
 * 1b. Slices: the same line within one slice (a value of a categorical column with enough holdout
 *    rows of each class), for a leak confined to part of the data; the same weighing of change.
 * 2. Dominance: the head's top feature has share >= dominanceShare, is >= runnerUpRatio times the
 *    runner-up, and alone earns >= relativePower of the full model's gain over a trivial predictor
 *    (AUC 0.5, R² 0). New or changed: the action. Already dominant on the base side and unchanged:
 *    info only, so a strong, legitimate feature does not block every pull request. Newly dominant
 *    without having changed (other features removed or weakened): a warning.
 * 3. Lift (docs/leak-rule.md): a new or changed feature whose drop-column loss on the head is above
 *    reseed noise carries `lift` = that loss over the base model's remaining loss. lift >= liftBlock:
 *    the action; liftWarn <= lift < liftBlock: a warning. The evidence also gives the share of the
 *    base's remaining loss the candidate removes and the feature's one-feature power against the
 *    full base model and the best existing single feature.
 * Lift and dominance blocks on a column in reviewedColumns become warnings that still name it.
 */
export function checkLeakage(context: LeakageContext, options: LeakageOptions): Finding[] {
  if (options.action === 'off') return []
  const { base, head, added, changed } = context
  const trivial = options.task === 'regression' ? 0 : 0.5
  const metricName = options.task === 'binary' ? 'AUC' : options.task === 'multiclass' ? 'one-vs-rest AUC' : 'R²'
  const sees = (name: string, slice: SliceSeparation) => (slice.besideColumn ? `${name} and ${slice.column} (so it can treat each ${slice.column} apart)` : name)
  const fullHead = mean(head.separation)
  const fullBase = mean(base.separation)
  const findings: Finding[] = []
  const ranked = rankFeatures(head.importances)
  const baseRanked = rankFeatures(base.importances)
  const flagged = new Set<string>()

  findings.push(...unevaluated(head, options, metricName))

  const cause = (name: string) => `${name}, ${added.has(name) ? 'new here' : changed.has(name) ? 'changed here' : 'unchanged here'}`
  const reviewed = new Set(options.reviewedColumns)
  const lifts = new Map<string, LiftEvidence>()
  for (const name of [...added, ...changed]) {
    const lift = liftEvidence(name, context, options.task)
    if (lift) lifts.set(name, lift)
  }
  const liftFields = (name: string) => {
    const l = lifts.get(name)
    return l ? liftRecord(l) : {}
  }

  for (const unit of ranked) {
    const alone = head.singleFeatureSeparation[unit.name]
    if (alone === undefined || !(alone >= options.singleFeaturePower)) continue
    const aloneBase = base.singleFeatureSeparation[unit.name]
    const isNewOrChanged = added.has(unit.name) || changed.has(unit.name)
    const crossed = aloneBase === undefined || !(aloneBase >= options.singleFeaturePower)
    const severity: Severity = isNewOrChanged || crossed ? options.action : 'warn'
    flagged.add(unit.name)
    // Multiclass: the power is the best class's one-vs-rest AUC; the finding names that class.
    const aloneClass = head.singleFeatureClasses?.[unit.name]
    const forClass = aloneClass === undefined ? '' : ` for the class '${aloneClass}'`
    findings.push({
      kind: 'leakage',
      severity,
      feature: unit.name,
      title: `${cause(unit.name)}, alone separates the holdout (${metricName} ${fmt(alone)}${forClass}).`,
      message:
        `A model that sees only ${unit.name} reaches holdout ${metricName} ${fmt(alone)}${forClass} ` +
        (aloneClass === undefined
          ? `(the full model reaches ${fmt(fullHead)}; the policy line is ${options.singleFeaturePower}). `
          : `(the best of its classes against the rest; the full model's macro one-vs-rest AUC is ${fmt(fullHead)}; the policy line is ${options.singleFeaturePower}). `) +
        `A value this predictive on its own usually means it is computed from, or after, the outcome. ` +
        (severity === 'warn' && !isNewOrChanged && !crossed
          ? `It was already this strong on the base side (${metricName} ${fmt(aloneBase)}), so this pull request did not introduce it.`
          : `Check that it is known at prediction time.`),
      evidence: {
        singleFeatureSeparation: alone,
        baseSingleFeatureSeparation: aloneBase ?? null,
        fullModelSeparation: fullHead,
        threshold: options.singleFeaturePower,
        share: positiveShare(head.importances, unit.name),
        isNew: added.has(unit.name),
        isChanged: changed.has(unit.name),
        isReviewed: reviewed.has(unit.name),
        ...(aloneClass !== undefined ? { singleFeatureClass: aloneClass } : {}),
        ...liftFields(unit.name),
      },
    })
  }

  // A leak confined to one slice: diluted on the whole holdout, near-perfect inside the slice.
  for (const unit of ranked) {
    const slice = head.singleFeatureSlices?.[unit.name]
    if (flagged.has(unit.name) || !slice || !(slice.separation >= options.singleFeaturePower)) continue
    const baseSlice = base.singleFeatureSlices?.[unit.name]
    const isNewOrChanged = added.has(unit.name) || changed.has(unit.name)
    const crossed = !baseSlice || !(baseSlice.separation >= options.singleFeaturePower)
    const severity: Severity = isNewOrChanged || crossed ? options.action : 'warn'
    const overall = head.singleFeatureSeparation[unit.name]
    flagged.add(unit.name)
    findings.push({
      kind: 'leakage',
      severity,
      feature: unit.name,
      title: `${cause(unit.name)}, alone separates the slice ${slice.column} = ${slice.value} (${metricName} ${fmt(slice.separation)}).`,
      message:
        `Within the ${slice.rows} holdout rows where ${slice.column} is '${slice.value}', a model that sees only ${sees(unit.name, slice)} reaches ` +
        `${metricName} ${fmt(slice.separation)} (on the whole holdout ${metricName} ${fmt(overall)}; the policy line is ${options.singleFeaturePower}). ` +
        `A value that gives the outcome away in one part of the data is often written after the fact by one system or site. ` +
        (severity === 'warn' && !isNewOrChanged && !crossed
          ? `It was already this strong in a slice on the base side (${baseSlice!.column} = ${baseSlice!.value}, ${metricName} ${fmt(baseSlice!.separation)}).`
          : `Check how ${unit.name} is recorded for ${slice.column} = ${slice.value}.`),
      evidence: {
        sliceColumn: slice.column,
        sliceValue: slice.value,
        sliceRows: slice.rows,
        sliceSeparation: slice.separation,
        baseSliceSeparation: baseSlice?.separation ?? null,
        singleFeatureSeparation: overall ?? null,
        threshold: options.singleFeaturePower,
        isNew: added.has(unit.name),
        isChanged: changed.has(unit.name),
        ...liftFields(unit.name),
      },
    })
  }

  // The lift rule: what a new or changed feature carries of the loss the base model left.
  for (const unit of ranked) {
    const lift = lifts.get(unit.name)
    if (flagged.has(unit.name) || !lift || !lift.isAboveNoise || !(lift.liftShare >= options.liftWarn)) continue
    const isReviewed = reviewed.has(unit.name)
    const strong = lift.liftShare >= options.liftBlock
    const severity: Severity = strong && !isReviewed ? options.action : 'warn'
    flagged.add(unit.name)
    const lossName = lossWords(options.metricName)
    const power =
      lift.alone === null
        ? ''
        : `; alone ${metricName} ${fmt(lift.alone)}` + (lift.bestExisting ? ` against ${fmt(lift.bestExisting.separation)} for the best existing feature (${lift.bestExisting.name})` : '')
    findings.push({
      kind: 'leakage',
      severity,
      feature: unit.name,
      title:
        `${cause(unit.name)}, carries ${pct(lift.liftShare)} of the ${lossName} the base model left ` +
        `(the model loses that much without it, ${fmt(lift.dropInReseedSds)} reseed SDs)${power}.`,
      message:
        `Refitted without ${unit.name} with the same seeds, the candidate's holdout ${lossName} grows by ${fmt(lift.dropLoss)} ` +
        `(95% interval ${fmt(lift.dropLower)} to ${fmt(lift.dropUpper)}, paired t-test p = ${fmt(lift.pValue)}) ` +
        `against a base ${lossName} of ${fmt(lift.baseLoss)}: ${pct(lift.liftShare)} of what the base model left. ` +
        `The candidate as a whole removes ${pct(lift.removedShare)} of it` +
        (lift.alone !== null ? `; ${unit.name} alone reaches ${metricName} ${fmt(lift.alone)} (full base model ${fmt(lift.fullBase)}` + (lift.bestExisting ? `, best existing single feature ${lift.bestExisting.name} ${fmt(lift.bestExisting.separation)})` : ')') : '') +
        `. One new feature that removes this much of the remaining error is the classic sign of a value computed from, or after, the outcome (common practice); ` +
        (isReviewed
          ? `it is listed in checks.leakage.reviewed_columns as reviewed and known at prediction time, so this is a warning.`
          : strong
            ? `check that it is known at prediction time, and if a person has checked it, list it in checks.leakage.reviewed_columns.`
            : `below the policy's lift_block of ${options.liftBlock}, so this is a warning; check that it is known at prediction time.`),
      evidence: { ...liftRecord(lift), liftWarn: options.liftWarn, liftBlock: options.liftBlock, isNew: added.has(unit.name), isChanged: changed.has(unit.name), isReviewed },
    })
  }

  // A slice leak too weak for the slice line: the model needs the feature, and inside one slice it
  // nearly gives the outcome away.
  for (const unit of ranked) {
    const lift = lifts.get(unit.name)
    const slice = head.singleFeatureSlices?.[unit.name]
    if (flagged.has(unit.name) || !lift || !lift.isAboveNoise || !slice || !(slice.separation >= options.sliceWarnPower)) continue
    flagged.add(unit.name)
    findings.push({
      kind: 'leakage',
      severity: 'warn',
      feature: unit.name,
      title:
        `${cause(unit.name)}, alone nearly separates the slice ${slice.column} = ${slice.value} (${metricName} ${fmt(slice.separation)}) ` +
        `and the model needs it (${pct(lift.liftShare)} of the loss the base model left).`,
      message:
        `Within the ${slice.rows} holdout rows where ${slice.column} is '${slice.value}', a model that sees only ${sees(unit.name, slice)} reaches ` +
        `${metricName} ${fmt(slice.separation)} (on the whole holdout ${metricName} ${fmt(lift.alone ?? undefined)}), and refitted without it the candidate's loss grows by ` +
        `${fmt(lift.dropLoss)} (${fmt(lift.dropInReseedSds)} reseed SDs). A value that gives the outcome away in one part of the data is often written after ` +
        `the fact by one system or site; check how ${unit.name} is recorded for ${slice.column} = ${slice.value}.`,
      evidence: {
        sliceColumn: slice.column,
        sliceValue: slice.value,
        sliceRows: slice.rows,
        sliceSeparation: slice.separation,
        sliceWarnPower: options.sliceWarnPower,
        ...liftRecord(lift),
        isNew: added.has(unit.name),
        isChanged: changed.has(unit.name),
      },
    })
  }

  const top = ranked[0]
  const runnerUp = ranked[1]
  if (top && !flagged.has(top.name) && top.mean > 0) {
    const share = positiveShare(head.importances, top.name)
    const ratio = runnerUp && runnerUp.mean > 0 ? top.mean / runnerUp.mean : Infinity
    const alone = head.singleFeatureSeparation[top.name]
    const relative = alone === undefined || !(fullHead > trivial) ? NaN : (alone - trivial) / (fullHead - trivial)
    const dominates = share >= options.dominanceShare && ratio >= options.runnerUpRatio && relative >= options.relativePower
    if (dominates) {
      const isNewOrChanged = added.has(top.name) || changed.has(top.name)
      const baseShare = positiveShare(base.importances, top.name)
      const wasDominant = baseRanked[0]?.name === top.name && baseShare >= options.dominanceShare
      const severityBefore: Severity = isNewOrChanged ? options.action : wasDominant ? 'info' : 'warn'
      const severity: Severity = severityBefore === 'block' && reviewed.has(top.name) ? 'warn' : severityBefore
      const scoreJump = separationJump(base.separation, head.separation)
      findings.push({
        kind: 'leakage',
        severity,
        feature: top.name,
        title: `${cause(top.name)}, dominates the model (${pct(share)} of the importance, ${fmtRatio(ratio)} the runner-up).`,
        message:
          `${top.name} carries ${pct(share)} of the total positive importance` +
          (runnerUp ? `, ${fmtRatio(ratio)} as much as ${runnerUp.name}` : '') +
          `, and a model that sees only it earns ${pct(relative)} of the full model's gain over a trivial predictor ` +
          `(${metricName} ${fmt(alone)} alone vs ${fmt(fullHead)} for the full model). ` +
          (wasDominant && !isNewOrChanged
            ? `It already dominated the base model (${pct(baseShare)}) and did not change, so this is reported for information.`
            : (added.has(top.name) ? 'The base side does not have it' : `On the base side its share was ${pct(baseShare)}`) +
              `; the full model's ${metricName} went from ${fmt(fullBase)} to ${fmt(fullHead)}` +
              (Number.isFinite(scoreJump) ? ` (${fmt(scoreJump)} reseed SDs).` : '.')),
        evidence: {
          share,
          baseShare,
          runnerUpRatio: Number.isFinite(ratio) ? ratio : null,
          runnerUp: runnerUp?.name ?? null,
          singleFeatureSeparation: alone ?? null,
          relativePower: Number.isFinite(relative) ? relative : null,
          fullModelSeparation: fullHead,
          baseFullModelSeparation: fullBase,
          separationJumpInSds: Number.isFinite(scoreJump) ? scoreJump : null,
          isNew: added.has(top.name),
          isChanged: changed.has(top.name),
          wasDominantOnBase: wasDominant,
          isReviewed: reviewed.has(top.name),
          ...liftFields(top.name),
        },
      })
    }
  }
  return findings
}

function liftRecord(l: LiftEvidence): Record<string, number | string | boolean | null> {
  const finite = (v: number) => (Number.isFinite(v) ? v : null)
  return {
    liftShare: finite(l.liftShare),
    removedShare: finite(l.removedShare),
    dropColumnLoss: finite(l.dropLoss),
    dropColumnLower: finite(l.dropLower),
    dropColumnUpper: finite(l.dropUpper),
    dropColumnPValue: finite(l.pValue),
    dropColumnInReseedSds: finite(l.dropInReseedSds),
    dropColumnAboveNoise: l.isAboveNoise,
    baseLoss: finite(l.baseLoss),
    headLoss: finite(l.headLoss),
    powerAgainstBaseModel: l.powerAgainstBase === null ? null : finite(l.powerAgainstBase),
    powerAgainstBestFeature: l.powerAgainstBest === null ? null : finite(l.powerAgainstBest),
    bestExistingFeature: l.bestExisting?.name ?? null,
  }
}

function lossWords(metric: string | undefined): string {
  switch (metric) {
    case 'rmse':
      return 'squared error'
    case 'auc':
      return '1 − AUC'
    case 'accuracy':
      return 'error rate'
    case 'r2':
      return '1 − R²'
    case undefined:
      return 'loss'
    default:
      return metric
  }
}

/** Difference of mean separation (head − base) in units of the pooled refit SD; NaN without spread. */
function separationJump(base: readonly number[], head: readonly number[]): number {
  if (base.length < 2 || head.length < 2) return NaN
  const mb = mean(base)
  const mh = mean(head)
  const sd = pooledStandardDeviation(sampleStandardDeviation(base), sampleStandardDeviation(head))
  return sd > 0 ? (mh - mb) / sd : NaN
}

/** The one number formatter, for values a side may lack. */
function fmt(value: number | undefined): string {
  return value === undefined ? 'n/a' : formatNumber(value)
}

function fmtRatio(ratio: number): string {
  return Number.isFinite(ratio) ? formatRatio(ratio) : 'infinitely'
}
