import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { closeTestDb } from '../support/db'
import { eventually, mailTo } from '../support/services'
import { makeCourse } from './fixtures/rosters/course'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

const FIXTURES = join(import.meta.dirname, 'fixtures', 'rosters')

// Full-page shots from the top, so the sticky header sits where a reader sees it.
async function shot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

/** Elements past the right edge when the page scrolls sideways (it must not, on a phone). */
async function overflowing(page: Page) {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth
    if (document.documentElement.scrollWidth <= width) return []
    const scrolls = (el: Element) => ['auto', 'scroll', 'hidden'].includes(getComputedStyle(el).overflowX)
    return [...document.querySelectorAll('body *')]
      .filter((el) => el.getBoundingClientRect().right > width + 1 && ![...ancestors(el)].some(scrolls))
      .slice(0, 5).map((el) => `${el.tagName.toLowerCase()}.${[...el.classList].slice(0, 4).join('.')} → ${Math.round(el.getBoundingClientRect().right)}`)
    function* ancestors(el: Element) {
      for (let p = el.parentElement; p && p !== document.body; p = p.parentElement) yield p
    }
  })
}

async function accessible(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

describe('roster and invitations in Chromium', () => {
  it('the instructor previews and imports a roster on the course page, places the students, and an invitee sets a password', async () => {
    const { course, instructor } = await makeCourse([{ code: 'A1', hoodStations: 4 }, { code: 'B1' }])
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, instructor.email, instructor.password)
    await page.goto(`/courses/${course.id}?tab=roster`)
    const picker = page.getByLabel('Roster file (CSV)')
    await picker.waitFor()
    await accessible(page)
    await shot(page, 'roster-panel-empty')

    // A file with problems: every bad row is shown, and the button says it will skip them.
    await picker.setInputFiles(join(FIXTURES, 'browser-roster-bad.csv'))
    await page.getByText('Not an e-mail address').waitFor()
    await page.getByText('No section “C9” in this course').waitFor()
    expect(await page.getByRole('button', { name: 'Import 1 student, skip 2 rows' }).isDisabled()).toBe(false)
    await accessible(page)
    await shot(page, 'roster-preview-errors')

    // The clean file: six rows, all new accounts.
    await picker.setInputFiles(join(FIXTURES, 'browser-roster.csv'))
    const importButton = page.getByRole('button', { name: 'Import 6 students' })
    await importButton.waitFor()
    expect(await page.locator('[data-test="roster-summary"]').innerText()).toContain('New accounts\n6')
    await accessible(page)
    await shot(page, 'roster-preview-clean')
    await importButton.click()
    await page.getByText('Roster imported').waitFor()
    await page.getByRole('cell', { name: 'Alba Merriweather', exact: true }).waitFor()

    await page.getByRole('button', { name: 'Pair and place everyone' }).click()
    await page.getByRole('dialog').getByRole('button', { name: 'Place everyone' }).click()
    const grid = page.locator('[data-test="station-grid"]')
    await expect.poll(() => grid.innerText()).toContain('Alba Merriweather & Bexley Corran')
    expect(await grid.innerText()).toContain('Cosima Thwaite & Dorian Pellow')
    await page.getByRole('button', { name: 'Change Elspeth Garrow' }).click()
    await page.getByRole('heading', { name: 'Change Elspeth Garrow' }).waitFor()
    await accessible(page)
    await shot(page, 'roster-stations')

    expect(tab.problems).toEqual([])
    await tab.context.close()

    // On a phone the same tab works without sideways scrolling (tables scroll inside their own box).
    const phone = await openTab(browser, { width: 390, height: 844 })
    await signInThroughPage(phone.page, instructor.email, instructor.password)
    await phone.page.goto(`/courses/${course.id}?tab=roster`)
    await phone.page.locator('[data-test="station-grid"]').getByText('Alba Merriweather & Bexley Corran').waitFor()
    expect(await overflowing(phone.page)).toEqual([])
    await shot(phone.page, 'roster-stations-phone')
    await phone.context.close()

    // The invitation e-mail's link opens the password page, anonymous.
    const [mail] = await eventually(async () => {
      const received = await mailTo('alba.merriweather@browser.example')
      return received.length > 0 && received
    })
    const link = /https?:\/\/\S+\/invite\/[A-Za-z0-9_-]{43}/.exec(mail!.text ?? '')![0]
    const invitee = await openTab(browser, { width: 430, height: 900 })
    await invitee.page.goto(new URL(link).pathname)
    await invitee.page.getByRole('heading', { name: 'Choose your password' }).waitFor()
    expect(await invitee.page.getByText('alba.merriweather@browser.example').count()).toBe(1)
    await accessible(invitee.page)
    await shot(invitee.page, 'invite-choose-password')

    await invitee.page.getByLabel(/^New password(?! again)/).fill('short')
    await invitee.page.getByLabel(/^New password again/).fill('short')
    await invitee.page.getByRole('button', { name: 'Set password and sign in' }).click()
    await invitee.page.getByText('Use at least 12 characters.').waitFor()
    await invitee.page.getByLabel(/^New password(?! again)/).fill('salt wedge in the estuary')
    await invitee.page.getByLabel(/^New password again/).fill('salt wedge in the estuary')
    await invitee.page.getByRole('button', { name: 'Set password and sign in' }).click()
    await invitee.page.waitForURL((url) => url.pathname === '/')
    await invitee.page.getByRole('heading', { name: 'Welcome, Alba' }).waitFor()
    await shot(invitee.page, 'invite-signed-in')
    expect(invitee.problems).toEqual([])
    await invitee.context.close()

    // The same link a second time: a clear sentence, no form.
    const again = await openTab(browser, { width: 430, height: 900 })
    await again.page.goto(new URL(link).pathname)
    await again.page.getByRole('heading', { name: 'This link has already been used' }).waitFor()
    expect(await again.page.getByLabel(/^New password(?! again)/).count()).toBe(0)
    await accessible(again.page)
    await shot(again.page, 'invite-used')
    await again.context.close()
  })
})
