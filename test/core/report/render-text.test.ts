import { describe, expect, it } from 'vitest'

import { renderText } from '../../../src/core/report/render-text.ts'
import { reportCaution, type GateReport } from '../../../src/core/report/report.ts'
import { courierReport, oversizedReport } from './courier-report.ts'

const lines = (text: string) => text.split('\n')

// Numbers are the courier fixture's, worked with NumPy and SciPy 1.10.1 (see courier-report.ts).
describe('renderText(report)', () => {
  const text = renderText(courierReport())

  it('opens with the verdict in words, the wrapped headline and the score change, and ends with the caution', () => {
    expect(lines(text).slice(0, 4)).toEqual([
      'plumbline: block',
      '',
      'Blocked: delivered_at_hour carries 68.1% of the head model’s importance and alone separates late',
      'deliveries, a leakage-like pattern.',
    ])
    expect(text.split('\n\n')[2]).toBe(
      'Holdout log-loss (lower is better): base 0.3412 [0.3398, 0.3425] → head 0.1874 [0.186, 0.1889],\n-45%, 136.2 reseed SDs better (95% intervals over refits).',
    )
    expect(text.split('\n\n').at(-1)!.replace(/\n/g, ' ')).toBe(reportCaution)
    expect(text.endsWith('\n')).toBe(false)
  })

  it('lists findings block first with the message and evidence indented under the title', () => {
    expect(text).toContain(
      [
        'Findings (5)',
        '  block: delivered_at_hour dominates the head model and alone separates late deliveries. (leakage;',
        '      feature: delivered_at_hour)',
        '      Its share of the positive importance is 0.6814 (policy: 0.5) and it is 3.949 times the next',
        '      feature (policy: 3). A one-feature model on it reaches holdout AUC 0.9931 (policy: 0.99).',
        '      evidence: dominance share 68.1%; dominance share limit 0.5; times the runner-up 3.949; runner',
        '      up ratio limit 3; single feature score 0.9931; single feature power 0.99',
        '  warn: promised_window_h fell from rank 3 to rank 5 among features above the floor. (rank shift;',
      ].join('\n'),
    )
  })

  it('aligns the feature table, numbers to the right, headers on two lines when it is wide', () => {
    expect(text).toContain(
      [
        '                                            rank base                                                                 floor base  floor head    share',
        '  feature                                      → head        importance base [95% CI]       importance head [95% CI]  (refit SD)  (refit SD)  of head  status',
        '  ----------------------------------------  ---------  ------------------------------  -----------------------------  ----------  ----------  -------  ---------------------------------------------',
        '  delivered_at_hour                             - → 1                               -        0.2415 [0.2383, 0.2447]           -    0.002588    68.1%  added, above floor',
        '  distance_km                                   1 → 2       0.0755 [0.07331, 0.07769]     0.06116 [0.05861, 0.06371]    0.001768    0.002053    17.3%  shifted -19%',
      ].join('\n'),
    )
    expect(lines(text)).toContain(
      '  legacy_zone                                   7 → -  0.00028 [-0.0007341, 0.001294]                              -   0.0008167           -        -  removed',
    )
  })

  it('keeps headers on one line when the table fits the width', () => {
    expect(text).toContain(
      [
        '  refit   base seed   head seed',
        '  -----  ----------  ----------',
        '      1  2890135721  4011392857',
      ].join('\n'),
    )
  })

  it('has the same sections as the comment, in plain text', () => {
    const headings = lines(text).filter((line) => /^[A-Z]/.test(line) && !/^(Blocked|A pass|Holdout)/.test(line))
    expect(headings).toEqual([
      'Findings (5)',
      'Feature importance',
      'Feature set',
      'Rank agreement',
      'Models and holdout scores per refit',
      'Refit seeds',
      'Settings and check thresholds',
      'Timings (wall-clock seconds; they vary from run to run)',
    ])
    expect(text).toContain('  Changed kind (1): driver_shift: numeric → categorical')
    expect(text).toContain('  Kendall tau-b                          0.7333     0.8667  0.8667 to 1 over 20 pairs  below the reseed threshold')
  })

  it('writes no markdown and no ANSI escape', () => {
    expect(text).not.toMatch(/\u001b|\\_|\*\*|\| |<details>|<!--/)
  })

  it('wraps prose at the width', () => {
    const narrow = renderText(courierReport(), { width: 60 })
    const prose = narrow.split('\n\n').filter((block) => !block.includes('----'))
    for (const line of prose.flatMap(lines)) expect(line.length).toBeLessThanOrEqual(60)
  })

  it('cuts long tables at maxTableRows with an "N more rows" row, and leaves short ones whole', () => {
    const cut = renderText(courierReport(), { maxTableRows: 3 })
    expect(lines(cut)).toContain('  6 more rows')
    expect(lines(cut)).toContain('  2 more rows')
    expect(cut).toContain("  policy applied               the head side's, to both sides")
    expect(lines(renderText(oversizedReport(5000, 0)))).toContain('  4,950 more rows')
  })

  it('replaces control characters in names, so a feature cannot drive the terminal', () => {
    const report = courierReport()
    const named = { ...report.features[1], name: 'x\u001b[2J\u001b]0;pwned\u0007' }
    const rendered = renderText({ ...report, features: [named], headline: 'bell\u0007 and\r\nbreak' })
    expect(rendered).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f]/)
    expect(rendered).toContain('  x\uFFFD[2J\uFFFD]0;pwned\uFFFD')
    expect(lines(rendered)[2]).toBe('bell\uFFFD and break')
  })

  it("shows an 'error' report as the headline, no verdict and the message indented, without the caution", () => {
    const error: GateReport = {
      ...courierReport(),
      verdict: 'error',
      headline: 'No verdict: plumbline failed with an internal error (a bug; please report it).',
      findings: [
        {
          kind: 'run-error',
          severity: 'block',
          title: 'plumbline failed with an internal error.',
          message: 'Internal error (this is a bug, please report it):\nTypeError: x is undefined\n    at runGate (run-gate.ts:12:3)',
          evidence: { isUserError: false },
        },
      ],
      sides: null,
      agreement: null,
      features: [],
    }
    expect(renderText(error, { width: 80 })).toBe(
      [
        'plumbline: error, no verdict',
        'No verdict: plumbline failed with an internal error (a bug; please report it).',
        'No verdict was reached: the run failed before the models could be compared. An\nerror is not a pass; fix the problem below and run the gate again.',
        '    Internal error (this is a bug, please report it):\n    TypeError: x is undefined\n        at runGate (run-gate.ts:12:3)',
      ].join('\n\n'),
    )
  })

  it('refuses a width under 40 or maxTableRows under 1 with a RangeError naming renderText', () => {
    expect(() => renderText(courierReport(), { width: 20 })).toThrow(
      new RangeError('renderText needs width to be a whole number of at least 40, got 20'),
    )
    expect(() => renderText(courierReport(), { maxTableRows: 0.5 })).toThrow(
      new RangeError('renderText needs maxTableRows to be a whole number of at least 1, got 0.5'),
    )
  })
})
