import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, createUser } from '../support/db'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close(); await closeTestDb() })

describe('course set-up in Chromium', () => {
  it('an instructor creates a course and a section through the pages', async () => {
    const owner = await createUser('instructor', { name: 'Mara Quillfeather' })
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, owner.email, owner.password)
    await page.goto('/courses')
    await page.getByRole('button', { name: 'New course' }).click()
    await page.getByLabel(/^Course code/).fill('CHEM 3110')
    await page.getByLabel(/^Term/).fill('Spring 2027')
    await page.getByLabel(/^Title/).fill('Physical Organic Laboratory')
    await page.getByLabel(/^Meetings and due dates are on/).check()
    await page.getByRole('button', { name: 'Create course' }).click()
    await page.waitForURL(/\/courses\/\d+/)
    await page.getByRole('heading', { name: /CHEM 3110/ }).waitFor()

    await page.getByRole('button', { name: 'Add a section' }).click()
    await page.getByLabel(/^Section code/).fill('F1')
    await page.getByLabel('Weekday').selectOption('5')
    await page.getByLabel(/^Room/).fill(`Quillfeather Annex ${owner.id}`)
    await page.getByLabel(/^First meeting/).fill('2027-01-15')
    await page.getByLabel(/^Last meeting/).fill('2027-04-30')
    await page.getByLabel('Skipped dates (holidays)').fill('2027-03-19')
    await page.getByRole('button', { name: 'Skip this date' }).click()
    await page.getByText(/^15 meetings/).waitFor()
    await screenshot(page, 'section-form')
    let violations = await seriousViolations(page)
    expect(violations, describeViolations(violations)).toEqual([])
    await page.getByRole('button', { name: 'Add section' }).click()
    await page.getByRole('link', { name: 'F1' }).waitFor()
    await screenshot(page, 'course-sections')

    await page.getByRole('link', { name: 'F1' }).click()
    await page.getByRole('heading', { name: 'Section F1', level: 1 }).waitFor()
    await page.getByText('Meetings (15)').waitFor()
    violations = await seriousViolations(page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(page, 'section-page')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a TA opens their section and sees its roster with stations, read-only', async () => {
    const tab = await openTab(browser, { width: 820, height: 1180 })
    await signInThroughPage(tab.page, DEMO.ta2)
    await tab.page.goto('/sections')
    await tab.page.getByRole('heading', { name: 'CHEM 2240 · T1' }).waitFor()
    expect(await tab.page.getByRole('heading', { name: /CHEM 2240 · (M1|W1)/ }).count()).toBe(0)
    await tab.page.getByRole('link', { name: 'Open section' }).first().click()
    await tab.page.getByRole('heading', { name: /Section (T1|R1)/, level: 1 }).waitFor()
    await tab.page.getByText('Station 1').first().waitFor()
    expect(await tab.page.getByRole('button', { name: /Pair and place/ }).count()).toBe(0)
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'ta-section-tablet')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('the coordinator reads the schedule', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.coordinator)
    await tab.page.goto('/schedule')
    await tab.page.getByRole('heading', { name: /Week of/ }).first().waitFor()
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'coordinator-schedule')
    await tab.context.close()
  })
})
