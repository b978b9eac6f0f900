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

const demoIds = async () => {
  const course = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
  const p1 = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()
  return { courseId: course.id, p1: p1.id }
}

describe('practicals in Chromium', () => {
  it('the instructor creates a practical, picks the meetings and sets the scale', async () => {
    const { courseId } = await demoIds()
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.instructor)
    await page.goto(`/courses/${courseId}`)
    await page.getByRole('tab', { name: 'Practicals' }).click()
    await page.getByRole('link', { name: 'Chlorination of 1-chlorobutane' }).waitFor()
    await page.getByRole('button', { name: 'New practical' }).click()
    const form = page.locator('form').filter({ has: page.getByRole('button', { name: 'Create practical' }) })
    await form.getByRole('button', { name: 'Create practical' }).click()
    // Validated with the route's own schema, beside each field.
    await form.getByText('Enter a title').waitFor()
    await form.getByText('Pick a substrate').waitFor()
    await form.getByLabel(/^Title/).fill('Chlorination of cyclohexane (make-up session)')
    await form.getByLabel(/^Substrate/).selectOption({ label: 'cyclohexane' })
    await form.getByLabel(/^Method/).selectOption({ label: 'Sulfuryl chloride with AIBN (80 °C)' })
    await screenshot(page, 'practical-create-form')
    await noSeriousViolations(page)
    await form.getByRole('button', { name: 'Create practical' }).click()
    await page.waitForURL(/\/practicals\/\d+$/)
    const id = Number(new URL(page.url()).pathname.split('/').at(-1))

    // Sessions: M1 at its second meeting; the due date follows a week later at 23:59.
    await page.getByRole('heading', { name: 'Meetings and due dates' }).waitFor()
    // The owner's page carries the chosen method's cautions once, compactly, after the editors.
    const cautions = page.locator('[data-test="safety-cautions"]')
    expect(await cautions.count()).toBe(1)
    expect(await cautions.getAttribute('data-hazards')).toBe('sulfuryl-chloride azo-initiator halogenated-waste')
    const meeting = page.getByLabel('Meeting for section M1')
    const secondMeeting = await meeting.locator('option').nth(2).getAttribute('value')
    await meeting.selectOption(secondMeeting!)
    const due = new Date(Date.parse(`${secondMeeting}T00:00:00Z`) + 7 * 86_400_000).toISOString().slice(0, 10)
    expect(await page.getByLabel('Due date, M1').inputValue()).toBe(due)
    expect(await page.getByLabel('Due time, M1').inputValue()).toBe('23:59')
    await page.getByRole('button', { name: 'Save meetings' }).click()
    await page.getByText('Meetings saved').waitFor()

    // Scale: the prefilled substrate row at 12 mmol; the live preview follows before saving.
    // Cyclohexane C6H12: 84.16 g/mol (IUPAC standard atomic weights) × 12 mmol = 1.010 g.
    await page.getByLabel('Amount, item 1').fill('12')
    await page.getByRole('cell', { name: '1.010 g' }).waitFor()
    await page.getByRole('button', { name: 'Save scale' }).click()
    await page.getByText('Scale saved').waitFor()
    await noSeriousViolations(page)
    await page.evaluate(() => window.scrollTo(0, 0))
    await screenshot(page, 'practical-owner-page')
    expect(tab.problems).toEqual([])

    const session = await testDb().selectFrom('practicalSessions').select('meetingDate').where('practicalId', '=', id).execute()
    expect(session).toEqual([{ meetingDate: secondMeeting }])
    const substrate = await testDb().selectFrom('practicalItems').select('amount').where('practicalId', '=', id).where('role', '=', 'substrate').executeTakeFirstOrThrow()
    expect(substrate.amount).toBe(12)
    // Leave the shared demo world as it was for the other files.
    await testDb().deleteFrom('practicals').where('id', '=', id).execute()
    await tab.context.close()
  })

  it('a student (student01, M1) opens their procedure card, on screen, in print and on a phone', async () => {
    const { p1 } = await demoIds()
    const tab = await openTab(browser, { width: 1100, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.student(1))
    await page.goto(`/practicals/${p1}`)
    await page.getByRole('heading', { name: 'Your meeting' }).waitFor()
    await page.getByRole('link', { name: 'Printable card' }).click()
    await page.waitForURL(/\/card$/)
    await page.getByRole('heading', { name: 'Chlorination of 1-chlorobutane' }).waitFor()
    // 10 mmol 1-chlorobutane = 0.926 g = 1.045 mL; 1.0 equiv SO2Cl2 = 1.350 g = 0.808 mL;
    // 2 mol % AIBN = 32.8 mg (IUPAC standard atomic weights; CRC Handbook densities, from memory).
    for (const figure of ['0.926 g', '1.045 mL', '1.350 g', '0.808 mL', '32.8 mg']) await page.getByRole('cell', { name: figure }).waitFor()
    await page.getByText('Sulfuryl chloride', { exact: true }).waitFor()
    await page.getByText(/These quantities are planning aids/).waitFor()
    await noSeriousViolations(page)
    await screenshot(page, 'procedure-card-student')
    await page.emulateMedia({ media: 'print' })
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).toBe(false)
    await screenshot(page, 'procedure-card-print')
    await page.emulateMedia({ media: 'screen' })
    await page.setViewportSize({ width: 390, height: 844 })
    await screenshot(page, 'procedure-card-phone')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a TA reads the practical without the editors', async () => {
    const { p1 } = await demoIds()
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.ta1)
    await tab.page.goto(`/practicals/${p1}`)
    await tab.page.getByRole('heading', { name: 'Meetings' }).waitFor()
    expect(await tab.page.getByRole('button', { name: 'Save scale' }).count()).toBe(0)
    await noSeriousViolations(tab.page)
    await screenshot(tab.page, 'practical-ta-page')
    await tab.context.close()
  })

  it('the account page shows the calendar address and replaces it after confirmation', async () => {
    const tab = await openTab(browser)
    const { page } = tab
    await signInThroughPage(page, DEMO.student(3))
    await page.goto('/account')
    const field = page.getByLabel('Your calendar address')
    await expect.poll(() => field.inputValue()).toMatch(/\/calendar\/[\w-]{43}\.ics$/)
    const before = await field.inputValue()
    await noSeriousViolations(page)
    await screenshot(page, 'account-calendar-feed')
    await page.getByRole('button', { name: 'Replace address' }).click()
    await page.getByRole('dialog').getByRole('button', { name: 'Replace address' }).click()
    await page.getByText('New calendar address ready').waitFor()
    await expect.poll(() => field.inputValue()).not.toBe(before)
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })
})
