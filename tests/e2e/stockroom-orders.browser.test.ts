import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb } from '../support/db'
import { mondayAfter, practicalMeetingOnce } from '../support/stockroom'

// A requested order in Chromium at 1440 and 820 px: a record with what came and what is open,
// not a form; a delivery entered from the page; the rest closed with a reason.

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

const uid = randomUUID().slice(0, 8)
const today = new Date().toISOString().slice(0, 10)

async function look(page: Page, name: string) {
  const violations = await seriousViolations(page)
  expect(violations, `${name}\n${describeViolations(violations)}`).toEqual([])
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

async function partlyReceivedOrder() {
  const api = await signedIn(DEMO.coordinator)
  const reagent = (await api.post('/api/stockroom/reagents', {
    name: `heptane ${uid}`, physicalState: 'liquid', density: 0.684, containerSize: 1000, unit: 'mL', supplierName: 'Flask and Co',
    supplierEmail: `flasks-${uid}@supplier.example`,
  })).body as { id: number, name: string }
  const sheet = (await api.post('/api/stockroom/orders', { title: `Term restock ${uid}` })).body as { id: number }
  await api.request(`/api/stockroom/orders/${sheet.id}`, { method: 'PATCH', json: {
    internalNotes: 'Charge to the teaching budget',
    lines: [
      { reagentId: reagent.id, name: reagent.name, supplierName: 'Flask and Co', supplierEmail: `flasks-${uid}@supplier.example`, containers: 4, containerSize: 1000, unit: 'mL' },
      { name: `Boiling chips ${uid}`, supplierName: 'Flask and Co', supplierEmail: `flasks-${uid}@supplier.example`, containers: 2, containerSize: 1, unit: 'each' },
    ],
  } })
  const sent = (await api.post(`/api/stockroom/orders/${sheet.id}/send`)).body as { lines: Array<{ id: number }> }
  const receipt = await api.post(`/api/stockroom/orders/${sheet.id}/receive`, { receivedOn: today, lines: [{ lineId: sent.lines[0]!.id, containers: 1, lotCode: 'K-1' }] })
  expect(receipt.status).toBe(200)
  return sheet.id
}

describe('a requested order in Chromium', () => {
  it('reads as a record at 1440 and 820 px; a delivery and closing the rest work from the page', async () => {
    const id = await partlyReceivedOrder()
    for (const width of [1440, 820]) {
      const tab = await openTab(browser, { width, height: 900 })
      await signInThroughPage(tab.page, DEMO.coordinator)
      await tab.page.goto(`/stockroom/orders/${id}`)
      const record = tab.page.locator('[data-test="order-record"]')
      await record.waitFor()
      // No greyed-out form: the record has no inputs, and says what is open.
      expect(await record.locator('input, textarea, select').count()).toBe(0)
      await record.getByText('3 open').waitFor()
      await tab.page.getByText('Partly received').first().waitFor()
      await tab.page.getByText('Charge to the teaching budget').waitFor()
      await look(tab.page, `stockroom-order-partly-${width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    }

    const tab = await openTab(browser, { width: 1440, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.coordinator)
    await page.goto(`/stockroom/orders/${id}`)
    // The second delivery: one more bottle; the boiling chips did not come.
    await page.getByLabel(`Containers that came, heptane ${uid}`).fill('1')
    await page.getByLabel(`Containers that came, Boiling chips ${uid}`).fill('0')
    await page.locator('[data-test="receive-submit"]').click()
    // Heptane goes from 3 open to 2; the chips stay at 2 open: both lines then read "2 open".
    await expect.poll(() => page.locator('[data-test="order-record"]').getByText('2 open').count()).toBe(2)
    await page.getByLabel('Why the rest will not come').fill('Supplier discontinued the bottles; chips from stores')
    await page.getByRole('button', { name: 'Close the rest' }).click()
    await page.getByRole('dialog').getByRole('button', { name: 'Close the rest' }).click()
    await page.locator('[data-test="closed-reason"]').getByText(/Supplier discontinued the bottles/).waitFor()
    await page.getByText('Received', { exact: true }).first().waitFor()
    expect(await page.locator('[data-test="receive-form"]').count()).toBe(0)
    await look(page, 'stockroom-order-closed-1440')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })
})

/** A practical of its own, meeting once far ahead, with an item no catalog reagent is linked to. */
async function farPracticalWithUnlinkedItem() {
  const monday = mondayAfter(200)
  await practicalMeetingOnce(`far ${uid}`, monday, 1, [
    { role: 'wash', name: `Brine ${uid}`, smiles: null, molarMass: null, density: null, basis: 'mL', amount: 10 },
  ])
  const api = await signedIn(DEMO.coordinator)
  await api.post('/api/stockroom/reagents', { name: `brine ${uid}`, physicalState: 'solution', density: 1.2, containerSize: 1000, unit: 'mL' })
  return monday
}

describe('the forecast with an item it cannot count, in Chromium', () => {
  it('the headline says what is not counted and the proposed link waits for Confirm, at 1440 and 820 px', async () => {
    const monday = await farPracticalWithUnlinkedItem()
    for (const width of [1440, 820]) {
      const tab = await openTab(browser, { width, height: 900 })
      await signInThroughPage(tab.page, DEMO.coordinator)
      await tab.page.goto(`/stockroom/forecast?from=${monday}&to=${monday}`)
      await tab.page.locator('[data-test="not-counted"]').getByText('1 item not counted').waitFor()
      await tab.page.locator('[data-test="short-stat"]').getByText('Not known').waitFor()
      await tab.page.locator('[data-test="proposed-link"]').filter({ hasText: `Brine ${uid}` }).waitFor()
      await look(tab.page, `stockroom-forecast-not-counted-${width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    }
  })
})
