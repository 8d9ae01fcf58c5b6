import type { SensitivityCheckConfig } from '../config.ts'
import type { Finding, SensitivityRow } from '../report/report.ts'
import { benjaminiHochberg } from '../statistics/benjamini-hochberg.ts'
import { tInterval } from '../statistics/t-interval.ts'
import { welchTTest } from '../statistics/welch-t-test.ts'
import { formatChange, formatNumber as fmt, formatPercent as pct } from '../report/format-number.ts'

/** One unit's prediction sensitivity on one side and one set of rows, as plain numbers. */
export interface SensitivitySample {
  readonly name: string
  readonly isGroup: boolean
  readonly mean: number
  /** Per-refit values, or with one refit its per-draw values (draw noise only). */
  readonly samples: readonly number[]
  readonly flipShare?: number
}

export interface SensitivitySideSamples {
  readonly holdout: readonly SensitivitySample[]
  /** Same units and order as `holdout`, with `samples` paired with holdout's (same refits or draws). */
  readonly unlabeled?: readonly SensitivitySample[]
}

export type SensitivityChange = NonNullable<SensitivityRow['change']>

/**
 * Findings of prediction sensitivity, no labels needed:
 *
 * - sensitivity-shift: for each unit on both sides, Welch's t-test (Welch 1947) of the base side's
 *   per-refit holdout sensitivities against the head's (one refit: the per-draw values), with
 *   Benjamini–Hochberg (1995) over the units compared. Reported when significant at
 *   `falseDiscoveryRate`, the change is at least `minRelativeChange` of the larger side's value, and
 *   that value is at least `minShare` of the largest feature's on its side (a feature the model
 *   barely uses is not reported for moving by a hair).
 * - sensitivity-unlabeled: on the head side, a unit whose sensitivity on the unlabeled rows is at
 *   least `unlabeledRatio` times its holdout value or at most its inverse, with the 95% t-interval
 *   of the paired differences (same refit, same draw seeds) excluding zero, and the larger of the two
 *   at least `minShare` of the largest holdout value. The inputs the model meets now make it lean on
 *   that feature differently from the rows it was judged on.
 *
 * Severity: the policy's action. Units with one value on a side cannot be tested and give none.
 */
export function checkSensitivity(
  base: SensitivitySideSamples | undefined,
  head: SensitivitySideSamples,
  options: SensitivityCheckConfig,
): { readonly findings: Finding[]; readonly changes: ReadonlyMap<string, SensitivityChange> } {
  const findings: Finding[] = []
  const changes = new Map<string, SensitivityChange>()
  const action = options.action
  if (action === 'off') return { findings, changes }
  const largest = (units: readonly SensitivitySample[]) => Math.max(0, ...units.filter((u) => !u.isGroup).map((u) => u.mean))

  if (base) {
    const baseBy = new Map(base.holdout.map((u) => [`${u.isGroup}:${u.name}`, u]))
    const pairs = head.holdout
      .map((h) => ({ h, b: baseBy.get(`${h.isGroup}:${h.name}`) }))
      .filter((p): p is { h: SensitivitySample; b: SensitivitySample } => p.b !== undefined && p.b.samples.length >= 2 && p.h.samples.length >= 2)
    const tests = pairs.map((p) => welchTTest(p.b.samples, p.h.samples))
    const adjusted = benjaminiHochberg(tests.map((t) => (Number.isNaN(t.pValue) ? 1 : t.pValue)))
    const floor = options.minShare * Math.max(largest(base.holdout), largest(head.holdout))
    pairs.forEach(({ b, h }, i) => {
      const test = tests[i]
      const isSignificant = !Number.isNaN(test.pValue) && adjusted[i] <= options.falseDiscoveryRate
      changes.set(h.name, { pValue: test.pValue, adjustedPValue: Number.isNaN(test.pValue) ? NaN : adjusted[i], isSignificant })
      const larger = Math.max(b.mean, h.mean)
      const relativeChange = larger > 0 ? Math.abs(h.mean - b.mean) / larger : 0
      if (!isSignificant || relativeChange < options.minRelativeChange || larger < floor || larger <= 0) return
      const direction = h.mean > b.mean ? 'rose' : 'fell'
      findings.push({
        kind: 'sensitivity-shift',
        severity: action,
        feature: h.name,
        title: `How much ${h.name} moves the predictions ${direction}: from ${fmt(b.mean)} to ${fmt(h.mean)} (${formatChange(b.mean, h.mean)}).`,
        message:
          `Mean absolute change of the model's output when ${h.name} takes reference values, on the holdout: ` +
          `${fmt(b.mean)} on the base side, ${fmt(h.mean)} on the head. Over ${b.samples.length} and ${h.samples.length} values, ` +
          `Welch's t = ${fmt(test.t)} (df ${fmt(test.df)}), p = ${fmt(test.pValue)}, Benjamini–Hochberg adjusted p = ${fmt(adjusted[i])} ` +
          `against a false discovery rate of ${options.falseDiscoveryRate}. This needs no labels: it is what the model does, not how well.`,
        evidence: {
          baseMean: b.mean,
          headMean: h.mean,
          relativeChange,
          ...(b.flipShare !== undefined ? { baseFlipShare: b.flipShare } : {}),
          ...(h.flipShare !== undefined ? { headFlipShare: h.flipShare } : {}),
          welchT: test.t,
          welchDf: test.df,
          pValue: test.pValue,
          adjustedPValue: adjusted[i],
        },
      })
    })
  }

  if (head.unlabeled) {
    const floor = options.minShare * largest(head.holdout)
    head.holdout.forEach((h, i) => {
      const u = head.unlabeled![i]
      if (u.samples.length < 2 || u.samples.length !== h.samples.length) return
      const larger = Math.max(u.mean, h.mean)
      if (larger <= 0 || larger < floor) return
      const ratio = h.mean > 0 ? u.mean / h.mean : Infinity
      if (ratio < options.unlabeledRatio && ratio > 1 / options.unlabeledRatio) return
      const interval = tInterval(u.samples.map((v, k) => v - h.samples[k]))
      if (!(interval.lower > 0 || interval.upper < 0)) return
      const more = u.mean > h.mean
      findings.push({
        kind: 'sensitivity-unlabeled',
        severity: action,
        feature: h.name,
        title: `On the unlabeled rows ${h.name} moves the candidate's predictions ${more ? 'more' : 'less'} than on the holdout (${fmt(u.mean)} against ${fmt(h.mean)}).`,
        message:
          `Mean absolute change of the head model's output when ${h.name} takes reference values: ${fmt(u.mean)} on data.unlabeled, ` +
          `${fmt(h.mean)} on the holdout (ratio ${fmt(ratio)}; the paired difference's 95% interval is [${fmt(interval.lower)}, ${fmt(interval.upper)}] ` +
          `over ${u.samples.length} values). The inputs the model meets now differ from those it was judged on, so the holdout score may not describe them.`,
        evidence: {
          unlabeledMean: u.mean,
          holdoutMean: h.mean,
          ratio: Number.isFinite(ratio) ? ratio : null,
          differenceLower: interval.lower,
          differenceUpper: interval.upper,
          ...(u.flipShare !== undefined ? { unlabeledFlipShare: u.flipShare } : {}),
          ...(h.flipShare !== undefined ? { holdoutFlipShare: h.flipShare } : {}),
        },
      })
    })
  }
  return { findings, changes }
}
