import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Locator, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'

// Wide tables on laptops and phones: the page itself never scrolls sideways, every column can be
// reached (inside the table's own scroll box is fine), a box that scrolls says so, and long lists
// let the page scroll instead of hiding rows in a short box.
let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close() })

const LAPTOP = { width: 1366, height: 900 }
const PHONE = { width: 390, height: 844 }

async function pageWidth(page: Page) {
  return page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, viewport: window.innerWidth }))
}

async function fitsSideways(page: Page, label: string) {
  const { scroll, viewport } = await pageWidth(page)
  console.info(`[layout] ${label}: page ${scroll} px wide in a ${viewport} px window`)
  expect.soft(scroll, `${label}: the page scrolls sideways`).toBeLessThanOrEqual(viewport)
}

/** Scrolled into view the way a reader would (scroll boxes included), nothing clips it. */
async function reachable(target: Locator) {
  // Hydrated first: every scroll box has measured itself, so nothing changes under the check.
  await target.page().waitForFunction(() => !document.querySelector('[data-scroll-box]:not([data-measured])'))
  await target.scrollIntoViewIfNeeded()
  return target.evaluate((el) => {
    const r = el.getBoundingClientRect()
    let left = 0
    let right = window.innerWidth
    for (let p = el.parentElement; p; p = p.parentElement) {
      if (getComputedStyle(p).overflowX === 'visible') continue
      const box = p.getBoundingClientRect()
      left = Math.max(left, box.left)
      right = Math.min(right, box.right)
    }
    return r.width > 0 && r.left >= left - 1 && r.right <= right + 1
  })
}

async function expectReachable(target: Locator, what: string) {
  expect.soft(await reachable(target), `${what} cannot be reached`).toBe(true)
}

/** Every scroll box whose content is wider than the box shows a hint; returns their sizes. */
async function scrollBoxes(page: Page) {
  // Boxes measure themselves on the frame after a resize: let two frames pass first.
  await page.evaluate(() => new Promise((resolve) => requestAnimationFrame(() => requestAnimationFrame(resolve))))
  const boxes = await page.evaluate(() => [...document.querySelectorAll('[role="region"]')]
    .filter((el) => (el as HTMLElement).offsetParent !== null)
    .map((el) => {
      const hint = el.closest('[data-scroll-box]')?.querySelector('[data-test="scroll-hint"]') as HTMLElement | null
      return {
        name: el.getAttribute('aria-label'),
        content: el.scrollWidth, box: el.clientWidth, contentHeight: el.scrollHeight, boxHeight: el.clientHeight,
        hinted: Boolean(hint && hint.offsetParent !== null && hint.innerText.trim()),
      }
    }))
  for (const b of boxes) {
    console.info(`[layout]   region "${b.name}": ${b.content}×${b.contentHeight} in ${b.box}×${b.boxHeight}${b.hinted ? ' (hint shown)' : ''}`)
    if (b.content > b.box + 1 || b.contentHeight > b.boxHeight + 1) expect.soft(b.hinted, `"${b.name}" scrolls without a visible cue`).toBe(true)
  }
  return boxes
}

async function accessible(page: Page) {
  const violations = await seriousViolations(page)
  expect.soft(violations, describeViolations(violations)).toEqual([])
}

async function shot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

/** The header row of the first table in `scope` still shows under the app bar once the page has scrolled past it. */
async function headerSticksToPage(page: Page, scope: Locator) {
  // A short window, so that the page can scroll the table's top out of sight.
  const size = page.viewportSize()!
  await page.setViewportSize({ width: size.width, height: 480 })
  const rows = scope.locator('tbody tr')
  await rows.nth((await rows.count()) - 1).scrollIntoViewIfNeeded()
  const { top, tableTop, bar } = await scope.locator('thead').first().evaluate((el) => ({
    top: el.getBoundingClientRect().top,
    tableTop: el.closest('table')!.getBoundingClientRect().top,
    bar: document.querySelector('header')!.getBoundingClientRect().bottom,
  }))
  await page.setViewportSize(size)
  console.info(`[layout]   header row at ${Math.round(top)} px under an app bar ending at ${Math.round(bar)} px, table top at ${Math.round(tableTop)} px`)
  return tableTop < 0 && top >= bar - 1 && top < bar + 8
}

describe('wide tables fit their page', () => {
  it('the section page at 1366 × 900: roster inside the page, every column and Change button reachable, every row on the page', async () => {
    for (const who of [DEMO.instructor, DEMO.ta1]) {
      const tab = await openTab(browser, LAPTOP)
      const { page } = tab
      await signInThroughPage(page, who)
      await page.goto('/sections/1')
      const table = page.getByRole('region', { name: 'Students in M1' })
      await table.waitFor()
      const role = who === DEMO.instructor ? 'instructor' : 'ta'
      await fitsSideways(page, `/sections/1 as ${role}`)
      await expectReachable(table.getByRole('columnheader', { name: 'E-mail' }), 'E-mail header')
      await expectReachable(table.getByRole('cell', { name: /@larkspur\.example/ }).first(), 'an e-mail address')
      if (role === 'instructor') {
        const change = table.getByRole('button', { name: /^Change/ })
        expect(await change.count()).toBe(16)
        await expectReachable(change.first(), 'the first Change button')
        await expectReachable(change.last(), 'the last Change button')
      }
      const boxes = await scrollBoxes(page)
      const roster = boxes.find((b) => b.name === 'Students in M1')!
      expect.soft(roster.contentHeight, 'the roster hides rows in a short box').toBeLessThanOrEqual(roster.boxHeight + 1)
      expect.soft(await headerSticksToPage(page, table), 'the roster header row does not stick').toBe(true)
      await accessible(page)
      await shot(page, `layout-section-${role}-1366`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    }
  })

  it('the section page on a phone scrolls the roster in its own box, with a hint', async () => {
    const tab = await openTab(browser, PHONE)
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto('/sections/1')
    const table = page.getByRole('region', { name: 'Students in M1' })
    await table.waitFor()
    await fitsSideways(page, '/sections/1 on a phone')
    await expectReachable(table.getByRole('button', { name: /^Change/ }).first(), 'the first Change button')
    await scrollBoxes(page)
    await accessible(page)
    await shot(page, 'layout-section-instructor-phone')
    await tab.context.close()
  })

  it('the outbox lets the page scroll instead of hiding messages', async () => {
    const tab = await openTab(browser, LAPTOP)
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    // Enough messages to pass the old 70vh box.
    for (let i = 0; i < 18; i++) await page.request.post('/api/outbox/test', { headers: { origin: new URL(page.url()).origin } })
    await page.goto('/outbox')
    const table = page.getByRole('region', { name: 'Messages' })
    await table.locator('tbody tr').nth(17).waitFor()
    await fitsSideways(page, '/outbox')
    const boxes = await scrollBoxes(page)
    const messages = boxes.find((b) => b.name === 'Messages')!
    expect.soft(messages.contentHeight, 'the outbox hides rows in a short box').toBeLessThanOrEqual(messages.boxHeight + 1)
    expect.soft(await headerSticksToPage(page, table), 'the outbox header row does not stick').toBe(true)
    await accessible(page)
    await shot(page, 'layout-outbox-1366')
    await page.setViewportSize(PHONE)
    await fitsSideways(page, '/outbox on a phone')
    await scrollBoxes(page)
    await shot(page, 'layout-outbox-phone')
    await tab.context.close()
  })

  it('the explorer and the procedure card on a phone', async () => {
    const tab = await openTab(browser, PHONE)
    const { page } = tab
    await signInThroughPage(page, DEMO.student(4))
    await page.goto('/explorer')
    await page.getByLabel(/^SMILES/).fill('CC(C)CC')
    await page.getByRole('button', { name: 'Analyse' }).click()
    await page.getByLabel('Observed mol % for position d').waitFor()
    await fitsSideways(page, '/explorer CC(C)CC on a phone')
    const products = page.getByRole('region', { name: 'Monohalogenation products' })
    for (const name of ['Statistical', /Cl2\/light, predicted/, /Br2\/light, predicted/, 'Observed mol %']) {
      await expectReachable(products.getByRole('columnheader', { name }), `explorer column ${name}`)
    }
    await expectReachable(page.getByLabel('Observed mol % for position d'), 'the last observed input')
    await scrollBoxes(page)
    await accessible(page)
    await shot(page, 'layout-explorer-phone')

    await page.goto('/practicals/2')
    await page.getByRole('heading', { name: 'Quantities' }).waitFor()
    await fitsSideways(page, '/practicals/2 on a phone')
    const quantities = page.getByRole('region', { name: 'Quantities' })
    for (const cell of await quantities.locator('td, th').all()) await expectReachable(cell, `quantities cell "${await cell.innerText()}"`)
    const windows = page.getByRole('region', { name: 'Expected products' })
    for (const cell of await windows.locator('td, th').all()) await expectReachable(cell, `products cell "${await cell.innerText()}"`)
    await scrollBoxes(page)
    await accessible(page)
    await shot(page, 'layout-practical-phone')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('every result of a practical at 1366 × 900, on screen and in print', async () => {
    const tab = await openTab(browser, LAPTOP)
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto('/results/practicals/1')
    await page.getByRole('group', { name: 'Show Every result as' }).getByRole('button', { name: 'Table' }).click()
    const values = page.getByRole('region', { name: 'Every result' })
    await values.waitFor()
    await fitsSideways(page, '/results/practicals/1')
    await expectReachable(values.getByRole('columnheader', { name: 'Outlier test' }), 'the Outlier test header')
    const flagged = values.getByRole('cell', { name: /^Flagged/ }).first()
    await expectReachable(flagged, 'a flagged result')
    await expectReachable(values.getByRole('columnheader', { name: 'In the figures' }), 'the In the figures header')
    await scrollBoxes(page)
    await accessible(page)
    await shot(page, 'layout-results-1366')

    await page.emulateMedia({ media: 'print' })
    await fitsSideways(page, '/results/practicals/1 in print')
    const cut = await values.evaluate((region) => {
      const card = region.closest('section')!.getBoundingClientRect()
      return [...region.querySelectorAll('th, td')].filter((c) => c.getBoundingClientRect().right > card.right + 1).map((c) => (c as HTMLElement).innerText).slice(0, 3)
    })
    expect.soft(cut, 'cells past the card in print').toEqual([])
    await shot(page, 'layout-results-print')
    await page.emulateMedia({ media: 'screen' })
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })
})
