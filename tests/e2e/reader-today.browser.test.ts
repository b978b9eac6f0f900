import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, openTab, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { addDays, isoWeekday, todayIn } from '../../shared/utils/dates'

// "Today" on a page is the reader's own day, not UTC's. The zone is chosen so that its date
// differs from UTC's at the moment the test runs: twelve hours behind UTC in the UTC morning,
// fourteen ahead in the afternoon (zones from the IANA tz database).
const zone = new Date().getUTCHours() < 12 ? 'Etc/GMT+12' : 'Pacific/Kiritimati'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(() => browser?.close())

async function signedInTab(email: string) {
  const tab = await openTab(browser, { width: 1440, height: 900 }, { timezoneId: zone })
  await signInThroughPage(tab.page, email)
  return tab
}

describe(`today in ${zone}`, () => {
  it('the forecast opens on the next four weeks from the reader\'s today, and its shortcut agrees', async () => {
    const today = todayIn(zone)
    expect(today).not.toBe(todayIn('UTC'))
    const { page } = await signedInTab(DEMO.coordinator)
    // Twice: the first load may render before the browser has told the server its zone.
    for (let i = 0; i < 2; i++) await page.goto('/stockroom/forecast')
    await expect.poll(() => page.getByRole('textbox', { name: /^From/ }).inputValue()).toBe(today)
    await expect.poll(() => page.getByRole('textbox', { name: /^To/ }).inputValue()).toBe(addDays(today, 27))
    await page.getByRole('textbox', { name: /^From/ }).fill('2027-01-04')
    await page.getByRole('button', { name: 'Next eight weeks' }).click()
    await expect.poll(() => page.getByRole('textbox', { name: /^From/ }).inputValue()).toBe(today)
    await expect.poll(() => page.getByRole('textbox', { name: /^To/ }).inputValue()).toBe(addDays(today, 55))
  })

  it('the schedule opens on the reader\'s own week', async () => {
    const today = todayIn(zone)
    const monday = addDays(today, 1 - isoWeekday(today))
    const { page } = await signedInTab(DEMO.instructor)
    for (let i = 0; i < 2; i++) await page.goto('/schedule')
    await expect.poll(() => page.getByRole('textbox', { name: /^From/ }).inputValue()).toBe(monday)
    await expect.poll(() => page.getByRole('textbox', { name: /^To/ }).inputValue()).toBe(addDays(monday, 27))
  })
})
