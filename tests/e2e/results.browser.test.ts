import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close(); await closeTestDb() })

async function noSeriousViolations(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

const demoPractical = async () => (await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()).id

/** Waits until `count` canvases exist and each has drawn something (not a blank bitmap). */
async function chartsDrawn(page: Page, count: number) {
  await page.waitForFunction((n) => {
    const canvases = [...document.querySelectorAll('canvas')].filter((c) => c.offsetParent !== null)
    if (canvases.length < n) return false
    return canvases.every((c) => {
      const ctx = c.getContext('2d')
      if (!ctx || !c.width || !c.height) return false
      const pixels = ctx.getImageData(0, 0, c.width, c.height).data
      for (let i = 3; i < pixels.length; i += 4 * 97) if (pixels[i] !== 0) return true
      return false
    })
  }, count, { timeout: 20_000 })
}

describe('class results in Chromium', () => {
  it('the instructor reads the demo practical: headline, charts, flagged runs, preview and print', async () => {
    const id = await demoPractical()
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto('/results')
    await page.getByRole('link', { name: 'Chlorination of 1-chlorobutane' }).waitFor()
    await screenshot(page, 'results-index')
    await noSeriousViolations(page)

    await page.getByRole('link', { name: 'Chlorination of 1-chlorobutane' }).click()
    await page.waitForURL(new RegExp(`/results/practicals/${id}$`))
    await page.getByRole('heading', { name: '2°:1° selectivity per H' }).waitFor()
    // Strip plot, histogram, sections, product mixture and the cross-term view.
    await chartsDrawn(page, 5)
    const n = await page.locator('dl', { hasText: 'Results (n)' }).locator('dd').first().innerText()
    expect(Number(n)).toBeGreaterThan(20)
    // The key factor leads with the geometric mean and its interval (never below zero); the
    // arithmetic mean follows, marked while the demo's flagged runs wait for a reviewer.
    const key = page.locator('section', { has: page.getByRole('heading', { name: '2°:1° selectivity per H' }) })
    const lead = key.locator('[data-headline]')
    expect(await lead.locator('dt').innerText()).toBe('Geometric mean')
    expect(await lead.innerText()).toMatch(/95 % CI \d+\.\d\d to \d+\.\d\d, on the log scale/)
    expect(await key.locator('[data-arithmetic-mean]').innerText()).toMatch(/Arithmetic mean[\s\S]*Pulled up by (1 flagged run|(?!1 )\d+ flagged runs) not yet reviewed/)
    expect(await page.getByText('Class mean').count()).toBe(0)
    // The solvent-counted run of the demo is flagged by the course's test (generalized ESD).
    const flagged = page.getByRole('table', { name: 'Runs the outlier test flags' })
    await flagged.waitFor()
    expect(await flagged.locator('tbody tr').count()).toBeGreaterThanOrEqual(1)
    await screenshot(page, 'results-practical')
    await noSeriousViolations(page)

    // The preview leaves the flagged runs out of the figures, and says so.
    await page.getByLabel('Preview without the flagged runs').check()
    await page.getByText(/Preview: (1 flagged run|(?!1 )\d+ flagged runs) left out/).waitFor()
    const without = await page.locator('dl', { hasText: 'Results (n)' }).locator('dd').first().innerText()
    expect(Number(without)).toBeLessThan(Number(n))
    await page.getByLabel('Preview without the flagged runs').uncheck()

    // Every chart has its table; the strip plot's lists every counted result.
    await page.getByRole('group', { name: 'Show Every result as' }).getByRole('button', { name: 'Table' }).click()
    const values = page.getByRole('region', { name: 'Every result' })
    await values.waitFor()
    expect(await values.locator('tbody tr').count()).toBe(Number(n))
    await page.getByRole('group', { name: 'Show Every result as' }).getByRole('button', { name: 'Chart' }).click()

    await page.selectOption('select', { value: 'modified-z' })
    await page.getByText(/Modified z-score \(median and MAD\), limit/).waitFor()
    // Dixon's Q cannot run on more than 10 results: the page says so and never "0 flagged".
    await page.selectOption('select', { value: 'dixon' })
    await page.getByText('The test could not run').waitFor()
    await page.getByText(/This test could not run on these results/).waitFor()
    expect(await page.getByText(/\b0 flagged/).count()).toBe(0)
    await page.getByRole('group', { name: 'Show Every result as' }).getByRole('button', { name: 'Table' }).click()
    expect(await values.locator('tbody tr', { hasText: 'Not flagged' }).count()).toBe(0)
    expect(await values.locator('tbody tr', { hasText: 'Not tested' }).count()).toBe(Number(n))
    await page.getByRole('group', { name: 'Show Every result as' }).getByRole('button', { name: 'Chart' }).click()
    await screenshot(page, 'results-practical-dixon-not-run')
    await page.selectOption('select', { value: 'gesd' })
    await page.getByText(/Generalized ESD \(several outliers\), α = 0\.05, up to \d+ outliers/).waitFor()
    await chartsDrawn(page, 5)

    await page.emulateMedia({ media: 'print' })
    await chartsDrawn(page, 5)
    // The print view leads with the same figure.
    expect(await lead.isVisible()).toBe(true)
    expect(await lead.locator('dt').innerText()).toBe('Geometric mean')
    await page.getByText(/Outlier test: Generalized ESD \(several outliers\) \(α = 0\.05, up to \d+ outliers\)/).waitFor()
    await screenshot(page, 'results-practical-print')
    await page.emulateMedia({ media: 'screen' })
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('the course settings offer the generalized ESD test, chosen for the demo course, with a line on when each test fits', async () => {
    const course = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').orderBy('id').executeTakeFirstOrThrow()
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto(`/courses/${course.id}?tab=settings`)
    const select = page.getByLabel('Test', { exact: true })
    await select.waitFor()
    expect(await select.inputValue()).toBe('gesd')
    expect(await select.locator('option').allInnerTexts()).toEqual(['Generalized ESD (several outliers)', "Grubbs' test (two-sided, iterative)", "Dixon's Q test (r10, 3–10 results)", 'Modified z-score (median and MAD)'])
    await page.getByText(/at least 2\) at once, so two bad runs cannot hide each other/).waitFor()
    // A choice made while the page still hydrates can be lost: choose again until the hint follows.
    const choose = async (test: string, hint: RegExp) => expect.poll(async () => {
      await select.selectOption(test)
      return page.getByText(hint).isVisible()
    }, { timeout: 20_000 }).toBe(true)
    await choose('grubbs', /with 6 or fewer results it is unreliable/)
    await choose('gesd', /so two bad runs cannot hide each other/)
    await screenshot(page, 'course-settings-outlier-test')
    await noSeriousViolations(page)
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('the digest page previews a student’s message in a sandbox; a TA sees only their sections', async () => {
    const id = await demoPractical()
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto(`/results/practicals/${id}/digest`)
    await page.getByRole('heading', { name: 'Section digests', level: 1 }).waitFor()
    const frame = page.locator('iframe[title="HTML version of the digest"]')
    await frame.waitFor()
    expect(await frame.getAttribute('sandbox')).toBe('')
    await page.frameLocator('iframe[title="HTML version of the digest"]').getByText('Class results').first().waitFor()
    await screenshot(page, 'results-digest')
    await noSeriousViolations(page)
    expect(tab.problems).toEqual([])
    await tab.context.close()

    const ta = await openTab(browser, { width: 390, height: 844 })
    await signInThroughPage(ta.page, DEMO.ta1)
    await ta.page.goto(`/results/practicals/${id}`)
    await ta.page.getByRole('heading', { name: '2°:1° selectivity per H' }).waitFor()
    await chartsDrawn(ta.page, 4)
    await ta.page.getByRole('group', { name: 'Show Section by section as' }).getByRole('button', { name: 'Table' }).click()
    const groups = await ta.page.getByRole('region', { name: 'Section figures' }).locator('tbody tr th, tbody tr td:first-child').allInnerTexts()
    expect(groups).toEqual(['Whole class', 'Section M1', 'Section W1'])
    expect(await ta.page.getByRole('heading', { name: 'Across terms' }).count()).toBe(0)
    await screenshot(ta.page, 'results-practical-ta-phone')
    await noSeriousViolations(ta.page)
    expect(ta.problems).toEqual([])
    await ta.context.close()
  })
})
