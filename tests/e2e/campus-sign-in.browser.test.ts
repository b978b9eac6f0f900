import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { expectAccessible, launchBrowser, openTab, screenshot } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { startServerProcess } from '../support/fault-world'

// The whole campus sign-in in Chromium, through the local identity provider the test world runs
// (scripts/identity-provider.mjs): a student and a TA land on their own pages, a stranger is
// turned away politely.

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

/** From Halocline's sign-in page through the provider's form, as `login`. */
async function throughProvider(page: Page, login: string) {
  await page.getByRole('link', { name: 'Sign in with your campus account' }).click()
  await page.waitForURL((url) => url.origin === inject('idpUrl'))
  await page.getByLabel('E-mail or campus id').fill(login)
  await page.getByLabel('Password').fill('halocline-demo')
  await page.getByRole('button', { name: 'Continue' }).click()
  await page.waitForURL((url) => url.origin === inject('baseUrl') && !url.pathname.startsWith('/auth/'))
}

const sessionOf = (page: Page) => page.evaluate(() => fetch('/api/_auth/session').then((r) => r.json())) as Promise<{ user?: { id: number, role: string } }>
const idOf = async (email: string) => (await testDb().selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()).id

describe('campus sign-in in Chromium', () => {
  it('the sign-in page offers the campus button first, password sign-in below, and passes axe', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/login')
    const campus = tab.page.getByRole('link', { name: 'Sign in with your campus account' })
    await campus.waitFor()
    const [buttonTop, emailTop] = await Promise.all([campus.boundingBox(), tab.page.getByLabel('E-mail').boundingBox()])
    expect(buttonTop!.y).toBeLessThan(emailTop!.y)
    await expectAccessible(tab.page)
    await screenshot(tab.page, 'sign-in-with-campus')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a student signs in by demo student id and lands on their own lab page', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/login')
    await throughProvider(tab.page, 'LS2640174') // student02: 2640100 + 2 × 37
    expect(new URL(tab.page.url()).pathname).toBe('/')
    await tab.page.getByRole('link', { name: 'My lab' }).first().waitFor()
    expect(await sessionOf(tab.page)).toEqual({ user: expect.objectContaining({ id: await idOf(DEMO.student(2)), role: 'student' }) })
    await screenshot(tab.page, 'campus-student-landing')
    // Signing out of Halocline offers to sign out of the campus account as well.
    await tab.page.getByRole('button', { name: /account menu/ }).click()
    await tab.page.getByRole('button', { name: /Sign out/ }).click()
    await tab.page.waitForURL((url) => url.pathname === '/login')
    await tab.page.getByText('You are signed out of Halocline.').waitFor()
    expect(await tab.page.getByRole('link', { name: 'Sign out of the campus account too' }).getAttribute('href')).toBe('/auth/campus/sign-out')
    await expectAccessible(tab.page)
    await screenshot(tab.page, 'campus-signed-out')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a TA who asked for the review queue signs in with the campus account and lands there', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/review')
    await tab.page.waitForURL((url) => url.pathname === '/login')
    await throughProvider(tab.page, DEMO.ta2)
    expect(new URL(tab.page.url()).pathname).toBe('/review')
    expect(await sessionOf(tab.page)).toEqual({ user: expect.objectContaining({ id: await idOf(DEMO.ta2), role: 'ta' }) })
    await tab.page.getByRole('link', { name: 'Review' }).first().waitFor()
    await screenshot(tab.page, 'campus-ta-review')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('a person with a campus account but no course is told whom to ask, and is not signed in', async () => {
    const tab = await openTab(browser)
    await tab.page.goto('/login')
    await throughProvider(tab.page, 'visitor@larkspur.example')
    expect(new URL(tab.page.url()).pathname).toBe('/sign-in-problem')
    await tab.page.getByRole('heading', { name: 'Halocline does not know you yet' }).waitFor()
    await tab.page.getByText('Ask your course instructor to add you to the course roster').waitFor()
    expect(await sessionOf(tab.page)).toEqual({})
    await expectAccessible(tab.page)
    await screenshot(tab.page, 'campus-unknown-person')
    expect(tab.problems).toEqual([])
    await tab.page.getByRole('link', { name: 'Back to sign-in' }).click()
    await tab.page.waitForURL((url) => url.pathname === '/login')
    await tab.context.close()
  })

  it('with password sign-in off, the password form is folded away for the administrators, and the break-glass one gets in', async () => {
    const locked = await startServerProcess({
      databaseUrl: inject('databaseUrl'),
      smtpPort: inject('smtpPort'),
      env: { ...inject('campusEnv'), NUXT_PASSWORD_SIGN_IN_MODE: 'off', NUXT_PASSWORD_SIGN_IN_BREAK_GLASS: DEMO.coordinator },
    })
    const tab = await openTab(browser)
    try {
      await tab.page.goto(`${locked.baseUrl}/login`)
      await tab.page.getByRole('link', { name: 'Sign in with your campus account' }).waitFor()
      expect(await tab.page.getByLabel('E-mail').isVisible()).toBe(false)
      await expectAccessible(tab.page)
      await tab.page.getByText('Administrators: password').click()
      await tab.page.getByLabel('E-mail').fill(DEMO.coordinator)
      await tab.page.getByLabel(/^Password/).fill('halocline-demo')
      await screenshot(tab.page, 'sign-in-break-glass')
      await tab.page.getByRole('button', { name: 'Sign in', exact: true }).click()
      await tab.page.waitForURL((url) => url.pathname === '/')
      expect(await sessionOf(tab.page)).toEqual({ user: expect.objectContaining({ role: 'coordinator' }) })
      expect(tab.problems).toEqual([])
    } finally {
      await tab.context.close()
      await locked.kill()
    }
  })
})
