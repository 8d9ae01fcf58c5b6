import { describe, expect, it } from 'vitest'

import { renderMarkdown } from '../../../src/core/report/render-markdown.ts'
import { reportCaution, type GateReport } from '../../../src/core/report/report.ts'
import { courierReport, oversizedReport } from './courier-report.ts'

const lines = (markdown: string) => markdown.split('\n')
const paragraphs = (markdown: string) => markdown.trimEnd().split('\n\n')
/** Everything a reader sees before the first collapsed section. */
const visible = (markdown: string) => markdown.split('\n<details>')[0]

function errorReport(message: string): GateReport {
  return {
    ...courierReport(),
    verdict: 'error',
    headline: 'No verdict: the check could not run (data/holdout.csv row 12 has text in a numeric column).',
    findings: [
      {
        kind: 'run-error',
        severity: 'block',
        title: 'The check could not run because of a problem in the inputs.',
        message,
        evidence: { isUserError: true },
      },
    ],
    features: [],
    featureSet: { added: [], removed: [], kindChanged: [] },
    agreement: null,
    sides: null,
  }
}

// The numbers in the expected lines are the courier fixture's, worked with NumPy and SciPy 1.10.1
// (see courier-report.ts) and rounded by hand to 4 significant digits.
describe('renderMarkdown(report)', () => {
  const markdown = renderMarkdown(courierReport())

  it('starts with the hidden marker, then the verdict in words and the headline', () => {
    expect(lines(markdown).slice(0, 5)).toEqual([
      '<!-- plumbline -->',
      '',
      '### plumbline: block',
      '',
      'Blocked: delivered\\_at\\_hour carries 68.1% of the head model’s importance and alone separates late deliveries, a leakage-like pattern.',
    ])
  })

  it('puts the score change right under the headline, and the caution last before the collapsed sections', () => {
    expect(lines(markdown)[6]).toBe(
      'Holdout log-loss (lower is better): base 0.3412 \\[0.3398, 0.3425\\] → head 0.1874 \\[0.186, 0.1889\\], -45%, 136.2 reseed SDs better (95% intervals over refits).',
    )
    expect(paragraphs(visible(markdown)).at(-1)).toBe(reportCaution)
    expect(markdown.endsWith('</details>\n')).toBe(true)
  })

  it('keeps what is visible before the first collapsed section to at most 45 lines', () => {
    expect(lines(visible(markdown)).length).toBeLessThanOrEqual(45)
  })

  it('lists at most 10 info titles before the first collapsed section and keeps the rest in the details', () => {
    const base = courierReport()
    const infos = Array.from({ length: 25 }, (_, i) => ({
      kind: 'sensitivity-shift' as const,
      severity: 'info' as const,
      feature: `feature_${i}`,
      title: `Info number ${i}.`,
      message: `Message ${i}.`,
      evidence: {},
    }))
    const many = renderMarkdown({ ...base, findings: [...base.findings.filter((f) => f.severity !== 'info'), ...infos] })
    const shown = visible(many)
    expect(shown).toContain('Info number 9.')
    expect(shown).not.toContain('Info number 10.')
    expect(shown).toContain('- 15 more info findings, in full in the details below.')
    expect(many).toContain('Info number 24.')
    expect(lines(shown).length).toBeLessThanOrEqual(45)
  })

  it('draws the top features of both sides as a mermaid xychart, head as bars and base as a line', () => {
    expect(markdown).toContain(
      [
        '```mermaid',
        'xychart-beta horizontal',
        '  title "Importance (bars: head, line: base), top 8"',
        '  x-axis ["delivered_at_hour (new)", "distance_km", "stop_count", "promised_window_h", "driver_shift", "depot", "weather_score", "legacy_zone (removed)"]',
        '  y-axis "log-loss worsening" 0 --> 0.253596',
        '  bar [0.24152, 0.06116, 0.0347, 0.00352, 0.0086, 0.0046, 0.00036, 0]',
        '  line [0, 0.0755, 0.04022, 0.0301, 0.01104, 0.00612, 0.00572, 0.00028]',
        '```',
      ].join('\n'),
    )
  })

  it('shows lift evidence and drop-column results under the score when the report has them', () => {
    const report = courierReport()
    const [leak, ...rest] = report.findings
    const withLift = { ...leak, evidence: { ...leak.evidence, liftShare: 0.31, dropColumnLoss: 0.05, dropColumnLower: 0.04, dropColumnUpper: 0.06, dropColumnInReseedSds: 4.2 } }
    const features = report.features.map((row) =>
      row.name === 'delivered_at_hour'
        ? { ...row, head: { ...row.head!, dropColumn: { loss: 0.05, lower: 0.04, upper: 0.06, pValue: 0.001, isAboveNoise: true, perRefit: [0.05] } } }
        : row,
    )
    const rendered = renderMarkdown({ ...report, findings: [withLift, ...rest], features } as GateReport)
    expect(lines(visible(rendered))).toContain(
      "Lift of delivered\\_at\\_hour: 31% of the loss the base model left; without it the head's loss grows by 0.05 \\[0.04, 0.06\\], 4.2 reseed SDs.",
    )
    expect(lines(visible(rendered))).toContain('Drop-column loss (refitted without the feature), largest: delivered\\_at\\_hour 0.05 \\[0.04, 0.06\\].')
    expect(rendered).toContain('| share of head | drop-column loss, head \\[95% CI\\] | status |')
    expect(rendered).toContain('| 68.1% | 0.05 \\[0.04, 0.06\\] | added, above floor |')
  })

  it('links the HTML report when given an https address, and refuses anything else', () => {
    const url = 'https://github.com/northwind/parcels/actions/runs/7/artifacts/9'
    expect(renderMarkdown(courierReport(), { htmlReportUrl: url })).toContain(
      `The HTML report, with charts of every feature: [download it from the workflow run](${url}).`,
    )
    expect(() => renderMarkdown(courierReport(), { htmlReportUrl: 'javascript:alert(1)' })).toThrow(RangeError)
    expect(() => renderMarkdown(courierReport(), { htmlReportUrl: 'https://x.example/a) [b](c' })).toThrow(RangeError)
  })

  it('lists the findings block first, then warn, then info; block and warn with their evidence in words, info as a title', () => {
    const findingLines = lines(markdown).filter((line) => line.startsWith('- **'))
    expect(findingLines.map((line) => line.slice(0, 12))).toEqual([
      '- **Block:**',
      '- **Warn:** ',
      '- **Warn:** ',
      '- **Info:** ',
      '- **Info:** ',
    ])
    expect(markdown).toContain('#### Findings: 1 block, 2 warn, 2 info')
    expect(lines(markdown)).toContain(
      '- **Block:** delivered\\_at\\_hour dominates the head model and alone separates late deliveries.',
    )
    expect(lines(markdown)).toContain(
      '  Evidence: base rank 3; head rank 5; places moved among shared features 2; mean difference -0.02658; p &lt;1e-6; adjusted p &lt;1e-6.',
    )
    expect(visible(markdown)).not.toContain('Features are compared by column name')
    expect(markdown).toContain('<summary>The 2 info findings in full</summary>')
    expect(markdown).toContain('- This pull request added delivered\\_at\\_hour; removed legacy\\_zone; changed the kind of driver\\_shift (numeric → categorical).\n  Features are compared by column name.')
  })

  it('sorts findings by severity even when the report does not', () => {
    const report = courierReport()
    const shuffled = renderMarkdown({ ...report, findings: [...report.findings].reverse() })
    const severities = lines(shuffled)
      .filter((line) => line.startsWith('- **'))
      .map((line) => line.slice(4, 9))
    expect(severities).toEqual(['Block', 'Warn:', 'Warn:', 'Info:', 'Info:'])
  })

  it('writes the feature table with ranks, intervals, floors, head share and status', () => {
    expect(lines(markdown)).toContain(
      '| feature | rank base → head | importance base \\[95% CI\\] | importance head \\[95% CI\\] | floor base (refit SD) | floor head (refit SD) | share of head | status |',
    )
    expect(lines(markdown)).toContain(
      '| delivered\\_at\\_hour | \\- → 1 | \\- | 0.2415 \\[0.2383, 0.2447\\] | \\- | 0.002588 | 68.1% | added, above floor |',
    )
    expect(lines(markdown)).toContain(
      '| promised\\_window\\_h | 3 → 6 | 0.0301 \\[0.02873, 0.03147\\] | 0.00352 \\[0.002948, 0.004092\\] | 0.001107 | 0.0004604 | 1% | shifted -88% |',
    )
    expect(lines(markdown)).toContain(
      '| route (group of distance\\_km, stop\\_count) | 1 → 1 | 0.1289 \\[0.1263, 0.1315\\] | 0.101 \\[0.09807, 0.1039\\] | 0.002058 | 0.002329 | 28.5% | shifted -22% |',
    )
    expect(lines(markdown)).toContain(
      '| legacy\\_zone | 7 → - | 0.00028 \\[-0.0007341, 0.001294\\] | \\- | 0.0008167 | \\- | \\- | removed |',
    )
  })

  it('says what the head indistinguishable from zero means in the status column', () => {
    const report = courierReport()
    const weather = report.features.find((row) => row.name === 'weather_score')!
    const unshifted = { ...weather, shift: { ...weather.shift!, isSignificant: false } }
    const rendered = renderMarkdown({ ...report, features: [unshifted] })
    expect(rendered).toContain('| 0.0006834 | 0.001343 | 0.1% | indistinguishable from zero |')
  })

  it('writes the feature-set diff and the rank agreement against the reseed null', () => {
    expect(lines(markdown)).toContain(
      'Feature set: added delivered\\_at\\_hour; removed legacy\\_zone; changed kind: driver\\_shift: numeric → categorical.',
    )
    expect(lines(markdown)).toContain('| Kendall tau-b | 0.7333 | 0.8667 | 0.8667 to 1 over 20 pairs | below the reseed threshold |')
    expect(lines(markdown)).toContain(
      '| rank-biased overlap, persistence 0.9 | 0.9548 | 0.9718 | 0.9718 to 1 over 20 pairs | below the reseed threshold |',
    )
  })

  it('collapses the info findings, the tables, scores per refit, seeds, settings and timings into <details> blocks', () => {
    expect(lines(markdown).filter((line) => line.startsWith('<summary>'))).toEqual([
      '<summary>The 2 info findings in full</summary>',
      '<summary>Feature importance, 9 rows</summary>',
      '<summary>Rank agreement against the reseed null</summary>',
      '<summary>Models and holdout scores per refit</summary>',
      '<summary>Refit seeds</summary>',
      '<summary>Settings and check thresholds</summary>',
      '<summary>Timings</summary>',
    ])
    expect(lines(markdown).filter((line) => line === '<details>')).toHaveLength(7)
    expect(lines(markdown).filter((line) => line === '</details>')).toHaveLength(7)
    expect(lines(markdown)).toContain('| 1 | 2890135721 | 4011392857 |')
    // The gate's own stage keys are shown in words; other keys as written.
    const timed = lines(renderMarkdown({ ...courierReport(), timings: { measureSeconds: 9.5, headSingleFeatureSeconds: 0.25, prepare: 1 } }))
    expect(timed).toContain('| refits, drop-column refits and importance, both sides | 9.5 |')
    expect(timed).toContain('| one-feature models, head | 0.25 |')
    expect(timed).toContain('| prepare | 1 |')
    expect(lines(markdown)).toContain('| metric | log-loss (lower is better) |')
    expect(lines(markdown)).toContain('| leakage | dominanceShare | 0.5 |')
    expect(lines(markdown)).toContain('| importance | 63.9 |')
  })

  it('cuts long tables at maxTableRows with a final "N more rows" row', () => {
    const cut = renderMarkdown(courierReport(), { maxTableRows: 3 })
    const table = lines(cut).filter((line) => line.startsWith('| '))
    const moreRows = table.indexOf('| 6 more rows | | | | | | | |')
    expect(moreRows).toBeGreaterThan(0)
    expect(table[moreRows - 1]).toMatch(/^\| stop\\_count \| 2 → 3 \|/)
    expect(lines(cut)).toContain('| 2 more rows | | |')
    expect(cut).not.toContain('This comment was shortened')
  })

  it('says so when there are no findings, no feature change, and no agreement', () => {
    const report = courierReport()
    const quiet = renderMarkdown({
      ...report,
      verdict: 'pass',
      findings: [],
      featureSet: { added: [], removed: [], kindChanged: [] },
      agreement: null,
    })
    expect(quiet).toContain('#### Findings\n\nNone.')
    expect(quiet).toContain('Feature set: the same 7 features on both sides.')
    expect(quiet).toContain('<summary>Rank agreement</summary>\n\nRank agreement was not computed for this run.')
    expect(paragraphs(visible(quiet)).at(-1)).toBe(reportCaution)
  })

  it('prints undefined statistics (NaN, null in JSON) as n/a', () => {
    const report = courierReport()
    const rendered = renderMarkdown({ ...report, agreement: { ...report.agreement!, kendallTau: NaN } })
    expect(lines(rendered)).toContain('| Kendall tau-b | n/a | 0.8667 | 0.8667 to 1 over 20 pairs | undefined |')
  })
})

describe('renderMarkdown(report) with hostile names', () => {
  const report = courierReport()
  const hostile = ['<img src=x onerror=alert(1)>', '@octocat|#12', '</details><!-- plumbline -->', '- [x] **done**']
  const rendered = renderMarkdown({
    ...report,
    headline: 'Blocked by @dispatch-leads, see #4 <b>now</b>',
    features: hostile.map((name, i) => ({ ...report.features[1], name, head: { ...report.features[1].head!, rank: i + 1 } })),
    featureSet: { added: hostile, removed: [], kindChanged: [] },
  })

  it('escapes names inside table cells, word for word', () => {
    expect(rendered).toContain('| &lt;img src=x onerror=alert(1)&gt; | 1 → 1 |')
    expect(rendered).toContain('| @\u2060octocat\\|#\u206012 | 1 → 2 |')
    expect(rendered).toContain('| &lt;/details&gt;&lt;!-- plumbline --&gt; | 1 → 3 |')
    expect(rendered).toContain('| \\- \\[x\\] \\*\\*done\\*\\* | 1 → 4 |')
  })

  it('keeps every feature-table row at 8 cells, so no name splits a cell', () => {
    const rows = lines(rendered).filter((line) => line.includes(' | 1 → '))
    expect(rows).toHaveLength(4)
    for (const row of rows) expect(row.split(/(?<!\\)\|/).length - 2).toBe(8)
  })

  it('leaves no live HTML tag, mention, issue link or second marker anywhere', () => {
    expect(rendered).not.toMatch(/<(img|b|script)\b/)
    expect(rendered).not.toMatch(/@(?!\u2060)/)
    expect(rendered).not.toMatch(/#(?=\d)/)
    expect(rendered.split('<!-- plumbline -->')).toHaveLength(2)
    expect(rendered.split('</details>')).toHaveLength(8)
    expect(lines(rendered)[4]).toBe('Blocked by @\u2060dispatch-leads, see #\u20604 &lt;b&gt;now&lt;/b&gt;')
  })
})

describe('renderMarkdown(report) size limit', () => {
  it('keeps 5,000 features and 2,000 findings under 60,000 characters and says what it cut', () => {
    const markdown = renderMarkdown(oversizedReport(5000, 2000))
    expect(markdown.length).toBeLessThanOrEqual(60_000)
    expect(lines(markdown)[0]).toBe('<!-- plumbline -->')
    expect(paragraphs(visible(markdown)).at(-2)).toBe(reportCaution)
    expect(markdown).toContain('| 4,990 more rows | | | | | | | |')
    const note = paragraphs(visible(markdown)).at(-1)!
    expect(note).toMatch(
      /^This comment was shortened to stay under 60,000 characters: the feature table shows 10 of 5,000 rows; the details \(info findings in full, rank agreement, models, scores and seeds per refit, settings, timings\) are left out; [\d,]+ of 2,000 findings are shown \(not shown: [\d,]+ warn, 1,000 info\)\. The full report is in the workflow run's job summary and in the JSON report file\.$/,
    )
    const shown = lines(markdown).filter((line) => line.startsWith('- **'))
    expect(shown.slice(0, 10).every((line) => line.startsWith('- **Block:**'))).toBe(true)
    expect(markdown).toMatch(/\n- [\d,]+ more findings are not shown here; see the note below\.\n/)
  })

  it('cuts the table before the details, and the details before the findings', () => {
    const full = renderMarkdown(oversizedReport(5000, 0), { maxCharacters: 1_000_000 })
    expect(full).toContain('| 4,950 more rows | | | | | | | |')
    expect(full).toContain('<details>')
    expect(full.length).toBeGreaterThan(8_000)
    const tight = renderMarkdown(oversizedReport(5000, 0), { maxCharacters: 8_000 })
    expect(tight.length).toBeLessThanOrEqual(8_000)
    expect(tight).toContain('<details>')
    expect(tight).toMatch(/the feature table shows (20|10|5) of 5,000 rows/)
    expect(tight).not.toContain('findings are shown')
  })

  it('stays under any limit from 2,000 to 65,536 characters', () => {
    const report = oversizedReport(5000, 2000)
    for (const maxCharacters of [2_000, 5_000, 20_000, 65_536]) {
      const markdown = renderMarkdown(report, { maxCharacters })
      expect(markdown.length).toBeLessThanOrEqual(maxCharacters)
      expect(visible(markdown)).toContain(reportCaution)
    }
  })

  it('renders the same markdown twice for the same report', () => {
    expect(renderMarkdown(oversizedReport(300, 200))).toBe(renderMarkdown(oversizedReport(300, 200)))
  })
})

describe("renderMarkdown(report) for an 'error' verdict", () => {
  it('shows the headline, says no verdict was reached, and puts the message in a code block', () => {
    const message = 'data/holdout.csv row 12, column distance_km: "12,5" is not a number.\nUse a dot as the decimal point.'
    expect(renderMarkdown(errorReport(message))).toBe(
      [
        '<!-- plumbline -->',
        '### plumbline: error, no verdict',
        'No verdict: the check could not run (data/holdout.csv row 12 has text in a numeric column).',
        'No verdict was reached: the run failed before the models could be compared. An error is not a pass; fix the problem below and run the gate again.',
        '```text\ndata/holdout.csv row 12, column distance_km: "12,5" is not a number.\nUse a dot as the decimal point.\n```',
      ].join('\n\n') + '\n',
    )
    // No verdict, so no caution about what a pass means.
    expect(renderMarkdown(errorReport(message))).not.toContain(reportCaution)
  })

  it('keeps a message with backtick fences inside its code block', () => {
    const rendered = renderMarkdown(errorReport('before\n```\n@octocat <b>x</b>\n```\nafter'))
    expect(rendered).toContain('````text\nbefore\n```\n@octocat <b>x</b>\n```\nafter\n````')
  })

  it('shortens a huge error message to fit and says so', () => {
    const rendered = renderMarkdown(errorReport('x'.repeat(100_000)), { maxCharacters: 10_000 })
    expect(rendered.length).toBeLessThanOrEqual(10_000)
    expect(rendered).toMatch(/\n\[9\d,\d{3} more characters in the full report\]\n```\n/)
    expect(paragraphs(rendered).at(-1)).toBe(
      "The error message was shortened to fit this comment. The full report is in the workflow run's job summary and in the JSON report file.",
    )
  })
})

describe('renderMarkdown(report, options) misuse', () => {
  it('refuses options out of range with a RangeError naming renderMarkdown', () => {
    const report = courierReport()
    expect(() => renderMarkdown(report, { maxTableRows: 0 })).toThrow(
      new RangeError('renderMarkdown needs maxTableRows to be a whole number of at least 1, got 0'),
    )
    expect(() => renderMarkdown(report, { maxCharacters: 500 })).toThrow(
      new RangeError('renderMarkdown needs maxCharacters to be a whole number of at least 1000, got 500'),
    )
    expect(() => renderMarkdown(report, { marker: 'plumbline' })).toThrow(
      new RangeError("renderMarkdown needs the marker to be a one-line HTML comment, got 'plumbline'"),
    )
  })

  it('uses a custom marker as the first line', () => {
    expect(lines(renderMarkdown(courierReport(), { marker: '<!-- plumbline: late-risk -->' }))[0]).toBe(
      '<!-- plumbline: late-risk -->',
    )
  })
})

describe('the mermaid chart with hostile names', () => {
  it('keeps every label inside its quotes and the fence unbroken', () => {
    const report = courierReport()
    const names = ['a"b', 'x```y', 'line\nbreak', '[x](javascript:alert(1))', 'ünïcode_name_that_is_far_too_long_for_a_label']
    const features = report.features.slice(0, names.length).map((row, i) => ({ ...row, name: names[i] }))
    const markdown = renderMarkdown({ ...report, features })
    const chart = markdown.split('```mermaid\n')[1].split('\n```')[0]
    expect(chart.split('\n')[2]).toBe(
      '  x-axis ["a?b (new)", "x???y", "line?break", "?x??javascript:alert?1??", "?n?code_name_that_is_fa…"]',
    )
    expect(chart).not.toContain('`')
  })
})

describe('evidence in words', () => {
  it('says nothing of a side that does not have the feature, and leaves out what was not computed', () => {
    const report = courierReport()
    const [leak, ...rest] = report.findings
    const finding = { ...leak, evidence: { share: 0.681, baseShare: 0, baseSingleFeatureSeparation: null, singleFeatureSeparation: 0.9931, runnerUp: null } }
    const rendered = renderMarkdown({ ...report, findings: [finding, ...rest] })
    expect(lines(rendered)).toContain('  Evidence: share of the importance 68.1%; a model on it alone, holdout AUC 0.9931.')
  })
})
