import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, openTab, signInThroughPage } from '../support/browser'
import { Client } from '../support/http'
import { closeTestDb, createUser } from '../support/db'

// Signing out from the account menu goes through POST /api/auth/logout (the module's own DELETE
// is refused) and still leaves the browser signed out, on the sign-in page.

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

describe('sign-out in Chromium', () => {
  it('the account menu signs out: the sign-in page, and the old cookie is dead', async () => {
    const user = await createUser('coordinator', { name: 'Oriel Sandmere' })
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, user.email, user.password)
    const cookies = await tab.context.cookies()
    const calls: string[] = []
    tab.page.on('request', (r) => { if (r.url().includes('/api/')) calls.push(`${r.method()} ${new URL(r.url()).pathname}`) })
    await tab.page.getByRole('button', { name: /account menu/ }).click()
    await tab.page.getByRole('button', { name: /Sign out/ }).click()
    await tab.page.waitForURL((url) => url.pathname === '/login')
    await tab.page.getByRole('heading', { name: 'Sign in' }).waitFor()
    expect(calls).toContain('POST /api/auth/logout')
    expect(calls).not.toContain('DELETE /api/_auth/session')
    // Going back in is the sign-in page again.
    await tab.page.goto('/')
    await tab.page.waitForURL((url) => url.pathname === '/login')
    const stolen = new Client()
    for (const c of cookies) stolen.cookies.set(c.name, c.value)
    expect((await stolen.get('/api/_auth/session')).body).toEqual({})
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })
})
