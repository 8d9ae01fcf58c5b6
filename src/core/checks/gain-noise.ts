import type { GainCheckConfig } from '../config.ts'
import { profileColumn, type ColumnProfile } from '../data/profile-column.ts'
import type { Finding } from '../report/report.ts'
import { formatNumber as fmt, formatPercent as pct } from '../report/format-number.ts'
import { rankByValue } from '../statistics/rank-by-value.ts'

/** One feature of the head side as the gain check reads it. */
export interface GainFeature {
  readonly name: string
  /** Mean over refits of the summed split gain. */
  readonly gain: number
  readonly splits: number
  /** Distinct non-missing values in the training rows. */
  readonly distinct: number
  /**
   * Whether the column looks like a row identifier or a record time (see `looksLikeIdentifier`):
   * only then does the finding suggest one. A continuous measurement also has a distinct value in
   * almost every row, so the count alone cannot tell the two apart.
   */
  readonly idLike: boolean
  /** Permutation importance on the holdout: its mean and whether its 95% interval lies above zero. */
  readonly importance: number
  readonly isAboveFloor: boolean
}

/**
 * "Fits noise in training": a feature the trees split on much (among the top `topRanks` by gain,
 * with at least `minGainShare` of the total) that has at least `minDistinct` distinct values, while
 * its permutation importance on the holdout is indistinguishable from zero (the 95% interval does
 * not lie above zero). Split gain is measured on the training rows and a feature with many distinct
 * values offers many split points, so noise in it can be fitted (Strobl, Boulesteix, Zeileis &
 * Hothorn 2007, BMC Bioinformatics 8:25): an identifier, a timestamp or a free-text code is the
 * usual culprit. Severity: the policy's action when the pull request added or changed the feature,
 * else info (it was so before).
 */
export function checkGainNoise(features: readonly GainFeature[], touched: ReadonlySet<string>, options: GainCheckConfig): Finding[] {
  const action = options.action
  if (action === 'off') return []
  const total = features.reduce((s, f) => s + Math.max(0, f.gain), 0)
  if (!(total > 0)) return []
  const ranked = rankByValue(features, (f) => f.gain)
  const findings: Finding[] = []
  ranked.slice(0, options.topRanks).forEach((f, i) => {
    const share = Math.max(0, f.gain) / total
    if (share < options.minGainShare || f.distinct < options.minDistinct || f.isAboveFloor) return
    const facts =
      `${f.name} has ${f.distinct} distinct values in the training rows and takes ${pct(share)} of the ensemble's split gain ` +
      `(${fmt(f.splits)} splits per model on average), yet replacing it on the holdout changes the score by ${fmt(f.importance)}, ` +
      'within reseed noise of zero. Gain is measured on the training rows and favours features with many distinct values ' +
      '(Strobl et al. 2007)'
    findings.push({
      kind: 'gain-noise',
      severity: touched.has(f.name) ? action : 'info',
      feature: f.name,
      title: f.idLike
        ? `${f.name} ranks ${i + 1} by the trees' gain (${pct(share)}) but is indistinguishable from zero on the holdout: it fits noise in training (an identifier?).`
        : `${f.name} ranks ${i + 1} by the trees' gain (${pct(share)}) but is indistinguishable from zero on the holdout: the trees fit training noise with it.`,
      message: f.idLike
        ? `${facts}; its values are nearly all different, as an identifier's or a record time's are: if this column identifies rows or ` +
          'encodes when or where a row was recorded, drop it or give it the role id.'
        : `${facts}; a measurement with many values offers many split points, so the trees can fit noise in it without it helping ` +
          'on new rows. Stronger regularisation (fewer bins, larger leaves) or leaving it out would cost nothing on this holdout.',
      evidence: { gainRank: i + 1, gainShare: share, splits: f.splits, distinct: f.distinct, idLike: f.idLike, importance: f.importance, touched: touched.has(f.name) },
    })
  })
  return findings
}

/**
 * Whether a training column looks like a row identifier or a record time: a categorical column whose
 * values are at least half distinct, or a whole-number column distinct in at least 90% of its
 * non-missing rows (a counter, a code, an epoch time). Common practice for spotting identifiers, not
 * a published rule; a float measurement with many values is not flagged.
 */
export function looksLikeIdentifier(kind: 'numeric' | 'categorical', values: ArrayLike<number>): boolean {
  return profileLooksLikeIdentifier(kind, profileColumn(values))
}

/** `looksLikeIdentifier` on a column already profiled. */
export function profileLooksLikeIdentifier(kind: 'numeric' | 'categorical', profile: ColumnProfile): boolean {
  if (profile.present === 0) return false
  const share = profile.distinct / profile.present
  return kind === 'categorical' ? share >= 0.5 : profile.wholeNumbers && share >= 0.9
}
