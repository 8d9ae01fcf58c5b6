import type { Finding, Severity } from '../report/report.ts'
import { mean, positiveShare, rankFeatures, type SideResult } from './side-result.ts'

import type { CheckAction } from './check-action.ts'
import { formatNumber, formatPercent as pct, formatRatio } from '../report/format-number.ts'

export interface LeakageOptions {
  readonly action: CheckAction
  readonly task: 'binary' | 'regression'
  /** The top feature's share of total positive importance at or above which it dominates. */
  readonly dominanceShare: number
  /** The top feature's importance over the runner-up's at or above which it dominates. */
  readonly runnerUpRatio: number
  /** A one-feature model's holdout AUC / R² at or above which the feature alone separates the holdout. */
  readonly singleFeaturePower: number
  /** A one-feature model's gain over a trivial predictor, relative to the full model's gain. */
  readonly relativePower: number
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
  const why = options.task === 'binary' ? 'the holdout holds one class only, so AUC is undefined' : 'the holdout target is constant, so R² is undefined'
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
 */
export function checkLeakage(context: LeakageContext, options: LeakageOptions): Finding[] {
  if (options.action === 'off') return []
  const { base, head, added, changed } = context
  const trivial = options.task === 'binary' ? 0.5 : 0
  const metricName = options.task === 'binary' ? 'AUC' : 'R²'
  const fullHead = mean(head.separation)
  const fullBase = mean(base.separation)
  const findings: Finding[] = []
  const ranked = rankFeatures(head.importances)
  const baseRanked = rankFeatures(base.importances)
  const flagged = new Set<string>()

  findings.push(...unevaluated(head, options, metricName))

  const describeChange = (name: string) =>
    added.has(name) ? 'new in this pull request' : changed.has(name) ? 'changed in this pull request' : 'unchanged'

  for (const unit of ranked) {
    const alone = head.singleFeatureSeparation[unit.name]
    if (alone === undefined || !(alone >= options.singleFeaturePower)) continue
    const aloneBase = base.singleFeatureSeparation[unit.name]
    const isNewOrChanged = added.has(unit.name) || changed.has(unit.name)
    const crossed = aloneBase === undefined || !(aloneBase >= options.singleFeaturePower)
    const severity: Severity = isNewOrChanged || crossed ? options.action : 'warn'
    flagged.add(unit.name)
    findings.push({
      kind: 'leakage',
      severity,
      feature: unit.name,
      title: `${unit.name} alone separates the holdout (${metricName} ${fmt(alone)}); it is ${describeChange(unit.name)}.`,
      message:
        `A model that sees only ${unit.name} reaches holdout ${metricName} ${fmt(alone)} ` +
        `(the full model reaches ${fmt(fullHead)}; the policy line is ${options.singleFeaturePower}). ` +
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
      title: `${unit.name} alone separates the slice ${slice.column} = ${slice.value} (${metricName} ${fmt(slice.separation)}); it is ${describeChange(unit.name)}.`,
      message:
        `Within the ${slice.rows} holdout rows where ${slice.column} is '${slice.value}', a model that sees only ${unit.name} reaches ` +
        `${metricName} ${fmt(slice.separation)} (on the whole holdout ${fmt(overall)}; the policy line is ${options.singleFeaturePower}). ` +
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
      const severity: Severity = isNewOrChanged ? options.action : wasDominant ? 'info' : 'warn'
      const scoreJump = separationJump(base.separation, head.separation)
      findings.push({
        kind: 'leakage',
        severity,
        feature: top.name,
        title: `${top.name} dominates the model (${pct(share)} of the importance, ${fmtRatio(ratio)} the runner-up); it is ${describeChange(top.name)}.`,
        message:
          `${top.name} carries ${pct(share)} of the total positive importance` +
          (runnerUp ? `, ${fmtRatio(ratio)} as much as ${runnerUp.name}` : '') +
          `, and a model that sees only it earns ${pct(relative)} of the full model's gain over a trivial predictor ` +
          `(${metricName} ${fmt(alone)} alone vs ${fmt(fullHead)} for the full model). ` +
          (wasDominant && !isNewOrChanged
            ? `It already dominated the base model (${pct(baseShare)}) and did not change, so this is reported for information.`
            : `On the base side its share was ${pct(baseShare)}; the full model's ${metricName} went from ${fmt(fullBase)} to ${fmt(fullHead)}` +
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
        },
      })
    }
  }
  return findings
}

/** Difference of mean separation (head − base) in units of the pooled refit SD; NaN without spread. */
function separationJump(base: readonly number[], head: readonly number[]): number {
  if (base.length < 2 || head.length < 2) return NaN
  const mb = mean(base)
  const mh = mean(head)
  const vb = base.reduce((s, v) => s + (v - mb) ** 2, 0) / (base.length - 1)
  const vh = head.reduce((s, v) => s + (v - mh) ** 2, 0) / (head.length - 1)
  const sd = Math.sqrt((vb + vh) / 2)
  return sd > 0 ? (mh - mb) / sd : NaN
}

/** The one number formatter, for values a side may lack. */
function fmt(value: number | undefined): string {
  return value === undefined ? 'n/a' : formatNumber(value)
}

function fmtRatio(ratio: number): string {
  return Number.isFinite(ratio) ? formatRatio(ratio) : 'infinitely'
}
