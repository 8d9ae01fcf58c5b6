import type { SlicesCheckConfig } from '../config.ts'
import type { FlooredImportance } from '../importance/compute-noise-floor.ts'
import type { Finding } from '../report/report.ts'
import { benjaminiHochberg } from '../statistics/benjamini-hochberg.ts'
import { welchTTest } from '../statistics/welch-t-test.ts'
import { formatNumber as fmt, formatPercent as pct } from '../report/format-number.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

/** One slice as the checks read it; a side is absent when the slice was not measured there. */
export interface SliceSides {
  readonly name: string
  readonly definition: string
  readonly status: 'measured' | 'too-small' | 'one-class'
  readonly headRows: number
  /** Columns the filter names: inside the slice they are (nearly) constant, so their importance there only measures moving rows out of it; left out of the slice's ranking. */
  readonly filterColumns: readonly string[]
  readonly base?: { readonly scores: readonly number[]; readonly importances: readonly FlooredImportance[] }
  readonly head?: { readonly scores: readonly number[]; readonly importances: readonly FlooredImportance[] }
}

export interface SliceCheckOptions extends SlicesCheckConfig {
  readonly metric: string
  readonly higherIsBetter: boolean
  /** Significance of a slice's score worsening, Benjamini–Hochberg over the slices compared (checks.score.alpha). */
  readonly alpha: number
  /** Dominance inside a slice, as checks.leakage defines it overall. */
  readonly dominanceShare: number
  readonly runnerUpRatio: number
}

export interface SliceScoreChange {
  /** Mean worsening of the slice's score from base to head (positive = worse), in metric units. */
  readonly worsening: number
  readonly pValue: number
  readonly adjustedPValue: number
}

/**
 * Findings per policy slice, on the head side's holdout rows of the slice:
 * - slice-score: the slice's score got worse between base and head beyond reseed noise: a one-sided
 *   Welch test (Welch 1947) of the per-refit slice scores, Benjamini–Hochberg (1995) over the slices
 *   compared, at `alpha`. Needs two refits a side (not for a loaded model).
 * - slice-dominance: inside the slice one feature holds at least `dominanceShare` of the positive
 *   importance and `runnerUpRatio` times the runner-up, above the floor, while it does not dominate
 *   overall (a leak or a shortcut confined to one part of the data). The policy's action when the
 *   pull request added or changed the feature, else info.
 * - slice-top-features (info): the slice's top feature above the floor is not the overall top feature.
 * Inside a slice the columns its filter names are left out of the ranking (see `filterColumns`).
 * - slice-too-small (info): fewer head rows than `minRows` (or one class only): not judged.
 */
export function checkSlices(
  slices: readonly SliceSides[],
  overall: readonly FlooredImportance[],
  touched: ReadonlySet<string>,
  options: SliceCheckOptions,
): { readonly findings: Finding[]; readonly changes: ReadonlyMap<string, SliceScoreChange> } {
  const action = options.action
  const findings: Finding[] = []
  const changes = new Map<string, SliceScoreChange>()
  if (action === 'off') return { findings, changes }
  const features = (units: readonly FlooredImportance[]) => rankByValue(units.filter((u) => !u.isGroup), (u) => u.mean)
  const overallSorted = features(overall)
  const overallTop = overallSorted[0]?.name
  const overallTotal = overallSorted.reduce((s, u) => s + Math.max(0, u.mean), 0)

  const compared = slices.filter((s) => s.base && s.head && s.base.scores.length >= 2 && s.head.scores.length >= 2)
  const tests = compared.map((s) => {
    const t = welchTTest(s.base!.scores, s.head!.scores)
    // meanDifference is base − head; worse is a drop for higher-is-better metrics, a rise for losses.
    const worsening = options.higherIsBetter ? t.meanDifference : -t.meanDifference
    const p = Number.isNaN(t.pValue) ? NaN : worsening > 0 ? t.pValue / 2 : 1 - t.pValue / 2
    return { t, worsening, p }
  })
  const adjusted = benjaminiHochberg(tests.map((t) => (Number.isNaN(t.p) ? 1 : t.p)))
  compared.forEach((s, i) => {
    const { t, worsening, p } = tests[i]
    changes.set(s.name, { worsening, pValue: p, adjustedPValue: Number.isNaN(p) ? NaN : adjusted[i] })
    if (Number.isNaN(p) || adjusted[i] > options.alpha || !(worsening > 0)) return
    const mean = (v: readonly number[]) => v.reduce((a, b) => a + b, 0) / v.length
    findings.push({
      kind: 'slice-score',
      severity: action,
      feature: s.name,
      title: `In the slice ${s.name} the holdout ${options.metric} got worse: ${fmt(mean(s.base!.scores))} → ${fmt(mean(s.head!.scores))}.`,
      message:
        `On the ${s.headRows} holdout rows where ${s.definition}, the ${options.metric} of the head's refits is worse than the base's by ${fmt(worsening)} ` +
        `(one-sided Welch t = ${fmt(t.t)}, df ${fmt(t.df)}, p = ${fmt(p)}, Benjamini–Hochberg adjusted over ${compared.length} slices p = ${fmt(adjusted[i])}, against ${options.alpha}).`,
      evidence: { slice: s.name, rows: s.headRows, worsening, welchT: t.t, welchDf: t.df, pValue: p, adjustedPValue: adjusted[i] },
    })
  })

  for (const s of slices) {
    if (s.status !== 'measured') {
      findings.push({
        kind: 'slice-too-small',
        severity: 'info',
        feature: s.name,
        title: `The slice ${s.name} was not judged: ${s.status === 'too-small' ? `${s.headRows} holdout rows, fewer than ${options.minRows}` : `its ${s.headRows} holdout rows hold one class only`}.`,
        message: `Slice ${s.name} (${s.definition}). ${s.status === 'too-small' ? 'A score and importances on so few rows would be mostly noise; lower checks.slices.min_rows or widen the filter.' : 'Scores and importances need rows of both classes.'}`,
        evidence: { slice: s.name, rows: s.headRows, minRows: options.minRows },
      })
      continue
    }
    if (!s.head) continue
    const ranked = features(s.head.importances).filter((u) => !s.filterColumns.includes(u.name))
    const total = ranked.reduce((sum, u) => sum + Math.max(0, u.mean), 0)
    const [top, runnerUp] = ranked
    if (!top || !(total > 0) || !top.isAboveFloor) continue
    const share = Math.max(0, top.mean) / total
    const ratio = runnerUp && runnerUp.mean > 0 ? top.mean / runnerUp.mean : Infinity
    const overallUnit = overallSorted.find((u) => u.name === top.name)
    const overallShare = overallUnit && overallTotal > 0 ? Math.max(0, overallUnit.mean) / overallTotal : 0
    if (share >= options.dominanceShare && ratio >= options.runnerUpRatio && overallShare < options.dominanceShare) {
      findings.push({
        kind: 'slice-dominance',
        severity: touched.has(top.name) ? action : 'info',
        feature: top.name,
        title: `Inside the slice ${s.name}, ${top.name} carries the model: ${pct(share)} of the importance there, ${pct(overallShare)} overall.`,
        message:
          `On the ${s.headRows} holdout rows where ${s.definition}, ${top.name}'s importance is ${fmt(top.mean)} (${Number.isFinite(ratio) ? `${fmt(ratio)} times` : 'far above'} the runner-up${runnerUp ? ` ${runnerUp.name}` : ''}). ` +
          'A feature that matters this much in one part of the data only can be a leak or a shortcut confined to it; check how it is computed there.',
        evidence: { slice: s.name, rows: s.headRows, share, runnerUpRatio: Number.isFinite(ratio) ? ratio : null, overallShare, touched: touched.has(top.name) },
      })
    } else if (top.name !== overallTop) {
      findings.push({
        kind: 'slice-top-features',
        severity: 'info',
        feature: top.name,
        title: `Inside the slice ${s.name} the model leans most on ${top.name}; overall it leans most on ${overallTop}.`,
        message: `On the ${s.headRows} holdout rows where ${s.definition} the head model's top feature is ${top.name} (importance ${fmt(top.mean)}); over the whole holdout it is ${overallTop}. Not a problem in itself: it says where the model works differently.`,
        evidence: { slice: s.name, rows: s.headRows, importance: top.mean },
      })
    }
  }
  return { findings, changes }
}
