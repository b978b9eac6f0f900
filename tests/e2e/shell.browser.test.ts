import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => { await browser?.close() })

const NAV: Record<string, { email: string, links: string[] }> = {
  instructor: { email: DEMO.instructor, links: ['Overview', 'Courses', 'Library', 'Review', 'Class results', 'Substrate explorer', 'Outbox', 'Demo mailbox'] },
  ta: { email: DEMO.ta1, links: ['Overview', 'My sections', 'Review', 'Class results', 'Library', 'Substrate explorer'] },
  coordinator: { email: DEMO.coordinator, links: ['Overview', 'Schedule', 'Stockroom', 'Library', 'Outbox', 'Demo mailbox'] },
  student: { email: DEMO.student(5), links: ['My lab', 'Substrate explorer'] },
}

describe('sign-in and the app shell in Chromium', () => {
  it('the sign-in page passes axe and has no console errors (CSP included)', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/login')
    await tab.page.getByRole('heading', { name: 'Sign in' }).waitFor({ state: 'visible' })
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'sign-in')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a wrong password shows the plain message beside the form', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/login')
    await tab.page.getByLabel('E-mail').fill(DEMO.ta2)
    await tab.page.getByLabel(/^Password/).fill('definitely-wrong')
    await tab.page.getByRole('button', { name: 'Sign in' }).click()
    await tab.page.getByText('E-mail or password is incorrect').waitFor()
    await tab.context.close()
  })

  it('the instructor signs in and lands on the overview', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.instructor)
    expect(new URL(tab.page.url()).pathname).toBe('/')
    await tab.page.getByRole('heading', { name: /Welcome, Ines/ }).waitFor()
    // Live figures: the demo's practical 1 has results waiting and flagged runs.
    await tab.page.getByRole('heading', { name: 'Waiting for review' }).waitFor()
    await tab.page.getByRole('heading', { name: 'Next practical' }).waitFor()
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'instructor-overview')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  for (const [role, { email, links }] of Object.entries(NAV)) {
    it(`${role} sees exactly the navigation of the role`, async () => {
      const tab = await openTab(browser)
      await signInThroughPage(tab.page, email)
      const nav = tab.page.getByRole('navigation', { name: /main/i }).first()
      await nav.getByRole('link', { name: links[0] }).waitFor()
      const names = (await nav.getByRole('link').allInnerTexts()).map((t) => t.trim())
      expect(names).toEqual(links)
      await tab.context.close()
    })
  }

  it('a signed-out visitor is sent to sign in, and back to the page afterwards', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/account')
    await tab.page.waitForURL(/\/login\?next=(%2F|\/)account/)
    await signInThroughPage(tab.page, DEMO.coordinator)
    await tab.page.waitForURL((url) => url.pathname === '/account')
    await tab.page.getByRole('heading', { name: /password/i }).first().waitFor()
    await tab.context.close()
  })

  it('the coordinator’s overview shows what to order and the waste to expect', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.coordinator)
    await tab.page.getByRole('heading', { name: 'To order for the next four weeks' }).waitFor()
    await tab.page.getByRole('heading', { name: 'Halogenated waste expected' }).waitFor()
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await screenshot(tab.page, 'coordinator-overview')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  // At a tablet's width (820 px) each role's main pages keep to the screen: every destination of
  // the navigation in sight, no sideways scrolling, and no table cell whose text runs out of it.
  const TABLET_PAGES: Record<string, string[]> = {
    instructor: ['/', '/courses', '/review', '/results'],
    ta: ['/', '/sections', '/review'],
    coordinator: ['/', '/schedule', '/stockroom', '/stockroom/catalog'],
    student: ['/', '/explorer'],
  }
  for (const [role, paths] of Object.entries(TABLET_PAGES)) {
    it(`at 820 px the ${role}'s pages keep to the screen`, async () => {
      const tab = await openTab(browser, { width: 820, height: 1180 })
      await signInThroughPage(tab.page, NAV[role]!.email)
      for (const path of paths) {
        await tab.page.goto(path)
        await tab.page.waitForLoadState('networkidle')
        const fit = await tab.page.evaluate(() => {
          const nav = [...document.querySelectorAll('nav[aria-label="Main"] a')].filter((a) => a.getClientRects().length)
          const outOfSight = (a: Element) => a.getBoundingClientRect().left < 0 || a.getBoundingClientRect().right > innerWidth
          return {
            hiddenNav: nav.filter(outOfSight).map((a) => a.textContent?.trim()),
            navCount: nav.length,
            sideways: document.documentElement.scrollWidth - document.documentElement.clientWidth,
            overflowingCells: [...document.querySelectorAll('main td, main th')]
              .filter((c) => c.scrollWidth > c.clientWidth + 1).map((c) => c.textContent?.trim().slice(0, 40)),
          }
        })
        expect(fit.navCount, path).toBe(NAV[role]!.links.length)
        expect(fit, path).toEqual({ hiddenNav: [], navCount: fit.navCount, sideways: 0, overflowingCells: [] })
      }
      await screenshot(tab.page, `${role}-tablet-last-page`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    })
  }

  it('on a phone the navigation folds into a menu button', async () => {
    const tab = await openTab(browser, { width: 390, height: 844 })
    await signInThroughPage(tab.page, DEMO.ta1)
    const button = tab.page.getByRole('button', { name: /menu/i }).first()
    await button.click()
    await tab.page.getByRole('link', { name: 'Review' }).first().waitFor()
    await screenshot(tab.page, 'ta-phone-menu')
    const violations = await seriousViolations(tab.page)
    expect(violations, describeViolations(violations)).toEqual([])
    await tab.context.close()
  })
})
