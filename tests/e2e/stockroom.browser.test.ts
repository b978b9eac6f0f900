import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

async function accessible(page: Page, name: string) {
  const violations = await seriousViolations(page)
  expect(violations, `${name}\n${describeViolations(violations)}`).toEqual([])
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

const today = new Date().toISOString().slice(0, 10)
const inFourWeeks = new Date(Date.parse(`${today}T00:00:00Z`) + 27 * 86_400_000).toISOString().slice(0, 10)

describe('the stockroom in Chromium', () => {
  it('the coordinator opens the forecast for the next four weeks and makes an order sheet from it', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.coordinator)
    await page.goto('/stockroom')
    await page.getByRole('heading', { name: 'Short in the next four weeks' }).waitFor()
    await page.locator('[data-test="overview-shortfalls"]').getByRole('link', { name: '2,3-dimethylbutane' }).waitFor()
    await accessible(page, 'stockroom-overview')

    await page.getByRole('navigation', { name: 'Stockroom' }).getByRole('link', { name: 'Forecast' }).click()
    await page.waitForURL(/\/stockroom\/forecast/)
    // The default range is the next four weeks.
    expect(await page.getByLabel(/^From/).inputValue()).toBe(today)
    expect(await page.getByLabel(/^To/).inputValue()).toBe(inFourWeeks)
    const row = page.getByRole('row').filter({ hasText: '2,3-dimethylbutane' }).first()
    await row.waitFor()
    await expect.poll(() => row.locator('[data-test="order-containers"]').textContent()).toBe('2 × 25 mL')
    await page.locator('canvas').first().waitFor()
    await page.getByRole('rowheader', { name: 'Halogenated waste (estimate)' }).waitFor()
    await accessible(page, 'stockroom-forecast')

    await page.locator('[data-test="make-order"]').click()
    await page.waitForURL(/\/stockroom\/orders\/\d+$/)
    const id = Number(page.url().split('/').at(-1))
    await page.locator('[data-test="order-line"]').first().waitFor()
    const lines = await testDb().selectFrom('orderLines').select(['name', 'containers', 'containerSize', 'unit']).where('orderId', '=', id).orderBy('position').execute()
    expect(lines).toEqual(expect.arrayContaining([{ name: '2,3-dimethylbutane', containers: 2, containerSize: 25, unit: 'mL' }]))
    expect(await page.locator('[data-test="order-line"]').count()).toBe(lines.length)
    // One more bottle of the alkane than the forecast asks for, saved.
    const alkane = page.locator('[data-test="order-line"]').filter({ has: page.locator('input[value="2,3-dimethylbutane"]') })
    await alkane.getByLabel(/^Containers/).fill('3')
    await page.getByRole('button', { name: 'Save', exact: true }).click()
    await page.getByText('Sheet saved').first().waitFor()
    const saved = await testDb().selectFrom('orderLines').select('containers').where('orderId', '=', id).where('name', '=', '2,3-dimethylbutane').executeTakeFirstOrThrow()
    expect(saved.containers).toBe(3)
    await page.getByText(/These are reminders, not a procedure/).waitFor()
    await accessible(page, 'stockroom-order-draft')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('the catalog, a reagent with its lots, and the forecast on a phone', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.coordinator)
    await page.goto('/stockroom/catalog')
    await page.getByRole('link', { name: 'sulfuryl chloride', exact: true }).waitFor()
    await accessible(page, 'stockroom-catalog')
    await page.getByRole('link', { name: 'sulfuryl chloride', exact: true }).click()
    await page.getByRole('heading', { name: 'sulfuryl chloride', level: 1 }).waitFor()
    await page.getByText('Expired: dispose of it').waitFor()
    await page.getByText(/confirm them against the supplier/).waitFor()
    await accessible(page, 'stockroom-reagent')
    await tab.context.close()

    const phone = await openTab(browser, { width: 390, height: 844 })
    await signInThroughPage(phone.page, DEMO.coordinator)
    await phone.page.goto('/stockroom/forecast')
    await phone.page.getByRole('row').filter({ hasText: '2,3-dimethylbutane' }).first().waitFor()
    await accessible(phone.page, 'stockroom-forecast-phone')
    // The full page is tall on a phone; one screenful of the weekly charts too, to look at closely.
    await phone.page.getByRole('heading', { name: 'Week by week' }).scrollIntoViewIfNeeded()
    await phone.page.screenshot({ path: join(inject('root'), 'test-results', 'screenshots', 'stockroom-forecast-phone-weeks.png') })
    expect([...tab.problems, ...phone.problems]).toEqual([])
    await phone.context.close()
  })
})
