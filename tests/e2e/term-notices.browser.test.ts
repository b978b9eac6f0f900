import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, openTab, screenshotFromTop, signInThroughPage } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { eventually, mailTo } from '../support/services'
import { insertRichResult, makeNamedCourse } from '../support/results'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

const WIDTHS = [1440, 820]

describe('notices of the term in the browser', () => {
  it('the digest page warns about runs waiting for review; the roster resends to all and invites a TA; a TA turns the summary off', async () => {
    const world = await makeNamedCourse({ sections: 2, studentsPerSection: 2 })
    const [a, b, c] = world.students
    await insertRichResult(world.practicalId, a!, { secondary: 3.2 })
    await insertRichResult(world.practicalId, b!, { secondary: 3.5, status: 'pending' })
    await insertRichResult(world.practicalId, c!, { secondary: 2.9, status: 'pending' })
    // Two students without a password yet.
    await testDb().updateTable('users').set({ passwordHash: null }).where('id', 'in', [b!.id, c!.id]).execute()

    for (const width of WIDTHS) {
      const tab = await openTab(browser, { width, height: 900 })
      await tab.page.goto('/login')
      await signInThroughPage(tab.page, world.owner.email, world.owner.password)
      await tab.page.goto(`/results/practicals/${world.practicalId}/digest`)
      const warning = tab.page.getByTestId('digest-pending')
      await warning.waitFor()
      expect(await warning.innerText()).toContain('2 runs still wait for review')
      expect(await warning.innerText()).toContain('S1 (1), S2 (1)')
      // The preview and the send form stay beside the warning; sending asks again with the same figures.
      await tab.page.getByLabel('Plain-text version of the digest').or(tab.page.getByTitle('HTML version of the digest')).waitFor()
      await screenshotFromTop(tab.page, `term-notices-digest-${width}`)
      await tab.page.getByRole('button', { name: 'Send the digests now' }).click()
      const dialog = tab.page.getByRole('dialog')
      expect(await dialog.innerText()).toContain('2 runs still wait for review (S1: 1, S2: 1) and are counted as they stand.')
      await dialog.getByRole('button', { name: 'Cancel' }).click()

      await tab.page.goto(`/courses/${world.course.id}?tab=roster`)
      const resend = tab.page.getByTestId('roster-resend-all')
      await resend.waitFor()
      expect(await resend.innerText()).toContain('2 students have not set a password yet.')
      await screenshotFromTop(tab.page, `term-notices-roster-${width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    }

    // Resend to all from the page: one fresh mail each.
    const tab = await openTab(browser, { width: 1440, height: 900 })
    await tab.page.goto('/login')
    await signInThroughPage(tab.page, world.owner.email, world.owner.password)
    await tab.page.goto(`/courses/${world.course.id}?tab=roster`)
    await tab.page.getByRole('button', { name: 'Send a fresh link to all 2' }).click()
    await tab.page.getByRole('dialog').getByRole('button', { name: 'Send' }).click()
    await tab.page.getByText('2 invitations sent').waitFor()
    for (const s of [b!, c!]) await eventually(async () => (await mailTo(s.email)).length === 1)

    // Invite a TA onto S2.
    const form = tab.page.getByTestId('roster-invite-ta')
    const email = `new-ta-${world.course.id}@invite.example`
    await form.getByLabel('E-mail').fill(email)
    await form.getByLabel('Name').fill('Marisol Quenby')
    await form.getByLabel('Section S2').check()
    await form.getByRole('button', { name: 'Invite TA' }).click()
    await tab.page.getByText('Marisol Quenby added to section S2').waitFor()
    await eventually(async () => (await mailTo(email)).length === 1)
    expect(tab.problems).toEqual([])
    await tab.context.close()

    // A TA's account page: the daily summary can be turned off.
    const ta = world.sections[0]!.ta
    for (const width of WIDTHS) {
      const taTab = await openTab(browser, { width, height: 900 })
      await taTab.page.goto('/login')
      await signInThroughPage(taTab.page, ta.email, ta.password)
      await taTab.page.goto('/account')
      const toggle = taTab.page.getByLabel('Send me the daily summary')
      await toggle.waitFor()
      if (width === WIDTHS[0]) {
        expect(await toggle.isChecked()).toBe(true)
        await toggle.uncheck()
        await taTab.page.getByText('Daily summary off').waitFor()
      }
      await screenshotFromTop(taTab.page, `term-notices-account-${width}`)
      taTab.problems.length = 0
      await taTab.context.close()
    }
    const row = await testDb().selectFrom('users').select('dailySummary').where('id', '=', ta.id).executeTakeFirstOrThrow()
    expect(row.dailySummary).toBe(false)
  })
})
