/**
 * The HTML report and the comment's mermaid chart in a real browser: Debian's chromium
 * (/usr/bin/chromium, installed by .ci/run) driven by playwright-core. Screenshots go to
 * test-output/html-report/ (gitignored) for a person to look at.
 */
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { chromium, type BrowserContext, type Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'

import { renderHtml } from '../../../src/core/report/render-html.ts'
import { mermaidChart } from '../../../src/core/report/render-mermaid.ts'
import type { GateReport } from '../../../src/core/report/report.ts'
import { courierReport } from './courier-report.ts'

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..')
const shots = join(root, 'test-output', 'html-report')
const hostileName = '<img src=x onerror=alert(1)> "quoted" & a very_long_feature_name_without_any_break_at_all_0123456789'

/** The courier report plus a drop-column result on two rows and a hostile, very long name. */
function richReport(): GateReport {
  const report = courierReport()
  const features = report.features.map((row, i) =>
    // The field the leakage check's refits without a feature fill in (SideImportance.dropColumn).
    i < 2 ? { ...row, head: { ...row.head!, dropColumn: { loss: 0.05 / (i + 1), lower: 0.04 / (i + 1), upper: 0.06 / (i + 1), pValue: 0.001, isAboveNoise: true, perRefit: [0.05] } } } : row,
  )
  const hostile = { ...report.features[2], name: hostileName }
  return { ...report, features: [...features, hostile] as unknown as GateReport['features'] }
}

const chromiumArgs = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run']
const profiles: string[] = []
/** Reports are read with script off (they must need none); the mermaid check needs it on. */
let noScript: BrowserContext
let withScript: BrowserContext

/** A fresh Chromium with its own new --user-data-dir (playwright passes it for a persistent context). */
async function launch(javaScriptEnabled: boolean): Promise<BrowserContext> {
  const profile = mkdtempSync(join(tmpdir(), 'plumbline-chromium-'))
  profiles.push(profile)
  return chromium.launchPersistentContext(profile, { executablePath: '/usr/bin/chromium', headless: true, args: chromiumArgs, javaScriptEnabled })
}

beforeAll(async () => {
  mkdirSync(shots, { recursive: true })
  noScript = await launch(false)
  withScript = await launch(true)
}, 60_000)

afterAll(async () => {
  await noScript?.close()
  await withScript?.close()
  for (const profile of profiles) rmSync(profile, { recursive: true, force: true })
})

/** Loads the HTML as the page's document, recording console errors and every network request. */
async function open(html: string, width: number, scheme: 'light' | 'dark' = 'light') {
  const page = await noScript.newPage()
  await page.setViewportSize({ width, height: 900 })
  await page.emulateMedia({ colorScheme: scheme })
  const errors: string[] = []
  const requests: string[] = []
  page.on('console', (message) => {
    if (message.type() === 'error') errors.push(message.text())
  })
  page.on('pageerror', (error) => errors.push(error.message))
  await page.route('**/*', async (route) => {
    requests.push(route.request().url())
    await route.abort()
  })
  await page.setContent(html, { waitUntil: 'load' })
  return { page, errors, requests, close: () => page.close() }
}

/** Text elements whose box leaves their SVG, or HTML text boxes whose content overflows them. */
async function clippedText(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const problems: string[] = []
    for (const text of Array.from(document.querySelectorAll('svg text'))) {
      const svg = (text as SVGTextElement).ownerSVGElement!.getBoundingClientRect()
      const box = text.getBoundingClientRect()
      if (box.left < svg.left - 0.5 || box.right > svg.right + 0.5) problems.push(`svg text '${text.textContent}'`)
    }
    for (const element of Array.from(document.querySelectorAll('body *'))) {
      const el = element as HTMLElement
      if (el.closest('svg') || el.closest('.tables')) continue
      if (el.scrollWidth > el.clientWidth + 1 && getComputedStyle(el).overflowX !== 'visible') problems.push(`${el.tagName} '${el.textContent?.slice(0, 40)}'`)
    }
    if (document.documentElement.scrollWidth > window.innerWidth + 1) problems.push(`page is ${document.documentElement.scrollWidth}px wide`)
    return problems
  })
}

describe('renderHtml(report) in Chromium', () => {
  const report = richReport()
  const html = renderHtml(report)

  it('is one self-contained document: no script, no external reference', () => {
    expect(html).not.toMatch(/<script\b/i)
    expect(html).not.toMatch(/<(img|link|iframe|object|embed|a)\b/i)
    expect(html).not.toMatch(/url\(/i)
    expect(html).not.toContain('<img')
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt; &quot;quoted&quot; &amp; a very_long')
  })

  for (const width of [1280, 390]) {
    for (const scheme of ['light', 'dark'] as const) {
      it(`draws every feature's marks, clips no text, logs no error and fetches nothing at ${width} px (${scheme})`, async () => {
        const { page, errors, requests, close } = await open(html, width, scheme)
        try {
          const marks = await page.evaluate(() =>
            Array.from(document.querySelectorAll('svg[data-feature]')).map((svg) => ({
              feature: svg.getAttribute('data-feature'),
              marks: svg.querySelectorAll('.mark, .drop').length,
              width: svg.getBoundingClientRect().width,
            })),
          )
          for (const row of report.features) {
            const drawn = marks.filter((m) => m.feature === row.name)
            // The importance chart, and the rank chart for features (not groups).
            expect(drawn.length, row.name).toBeGreaterThanOrEqual(row.isGroup ? 1 : 2)
            const sides = (row.base ? 1 : 0) + (row.head ? 1 : 0)
            expect(drawn[0].marks, row.name).toBe(sides)
            expect(drawn[0].width, row.name).toBeGreaterThan(100)
          }
          expect(await page.locator('.null').count()).toBe(report.agreement!.nullKendallTau.length + report.agreement!.nullRankBiasedOverlap.length)
          expect(await page.locator('.observed').count()).toBe(2)
          expect(await page.locator('.dot.base').count()).toBe(report.sides!.base.scores.length)
          expect(await page.locator('.dot.head').count()).toBe(report.sides!.head.scores.length)
          expect(await page.locator('circle.drop').count()).toBe(2)
          // Nothing to fetch or follow, and the hostile name is text, not an element.
          expect(await page.locator('[src], [href], img').count()).toBe(0)
          expect(await page.getByText(hostileName).count()).toBeGreaterThan(0)
          expect(await clippedText(page)).toEqual([])
          expect(errors).toEqual([])
          expect(requests).toEqual([])
          await page.screenshot({ path: join(shots, `report-${width}-${scheme}.png`), fullPage: true })
        } finally {
          await close()
        }
      }, 60_000)
    }
  }

  it('prints without losing the charts', async () => {
    const { page, close } = await open(html, 1280)
    try {
      await page.emulateMedia({ media: 'print' })
      expect(await page.locator('svg[data-feature] .mark').count()).toBeGreaterThan(report.features.length)
      await page.screenshot({ path: join(shots, 'report-print.png'), fullPage: true })
    } finally {
      await close()
    }
  }, 60_000)
})

describe('the comment\'s mermaid chart in Chromium', () => {
  it('parses and renders with mermaid 11 as an xychart with one bar per feature', async () => {
    const chart = mermaidChart(courierReport())!
    const page = await withScript.newPage()
    await page.setViewportSize({ width: 900, height: 700 })
    const errors: string[] = []
    page.on('pageerror', (error) => errors.push(error.message))
    page.on('console', (message) => {
      if (message.type() === 'error') errors.push(message.text())
    })
    try {
      await page.route('**/*', (route) => route.abort())
      await page.setContent('<!DOCTYPE html><html><body><div id="chart"></div></body></html>')
      await page.addScriptTag({ content: readFileSync(join(root, 'node_modules', 'mermaid', 'dist', 'mermaid.min.js'), 'utf8') })
      const result = await page.evaluate(async (source) => {
        const mermaid = (window as unknown as { mermaid: { initialize(o: object): void; parse(s: string): Promise<unknown>; render(id: string, s: string): Promise<{ svg: string }> } }).mermaid
        mermaid.initialize({ startOnLoad: false })
        const parsed = await mermaid.parse(source)
        const { svg } = await mermaid.render('chart-svg', source)
        document.getElementById('chart')!.innerHTML = svg
        return { parsed: Boolean(parsed), bars: document.querySelectorAll('#chart .bar-plot-0 rect').length, hasLine: document.querySelectorAll('#chart [class*="line-plot"] path').length, classes: Array.from(new Set(Array.from(document.querySelectorAll('#chart g[class]')).map((g) => g.getAttribute('class')))).join(' ') }
      }, chart)
      expect(result.parsed).toBe(true)
      expect(result.bars).toBe(8)
      expect(result.hasLine, result.classes).toBe(1)
      expect(errors).toEqual([])
      await page.screenshot({ path: join(shots, 'comment-chart.png') })
    } finally {
      await page.close()
    }
  }, 60_000)
})

describe('renderHtml(report), pure', () => {
  it('gives the same bytes twice, and an error page with the message, no charts and no caution', () => {
    expect(renderHtml(courierReport())).toBe(renderHtml(courierReport()))
    const report = courierReport()
    const failed: GateReport = {
      ...report,
      verdict: 'error',
      headline: 'No verdict: the check could not run (head: data/train.csv has no target column).',
      findings: [{ kind: 'run-error', severity: 'block', title: 'The check could not run because of a problem in the inputs.', message: 'head: data/train.csv has no target column <late>.', evidence: { isUserError: true } }],
      features: [],
      sides: null,
      agreement: null,
    }
    const html = renderHtml(failed)
    expect(html).toContain('<span class="verdict v-error">NO VERDICT</span>')
    expect(html).toContain('head: data/train.csv has no target column &lt;late&gt;.')
    expect(html).not.toContain('<svg')
    expect(html).not.toContain('A pass is not proof')
  })
})
