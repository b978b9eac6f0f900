import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser, Locator, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshotFromTop, seriousViolations, signInThroughPage } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { makeReviewWorld, reviewPeakTable, signInAs, uploadAs, type ReviewWorld } from '../support/review'

// The decision panel's new due time and the student's "sent back" state, as people see them at
// desktop (1440 px) and tablet (820 px) width.

let browser: Browser
let world: ReviewWorld
const ids: number[] = []
const DESKTOP = { width: 1440, height: 900 }
const TABLET = { width: 820, height: 1180 }
const reason = 'The starting material peak at 2.3 min was counted as a product. Integrate again without it and upload the new table.'

beforeAll(async () => {
  browser = await launchBrowser()
  world = await makeReviewWorld({ sections: 1, studentsPerSection: 4 })
  const students = world.sections[0]!.students
  for (const [i, by] of [students[0]!, students[2]!].entries()) {
    const reply = await uploadAs(await signInAs(by), world.practicalId, reviewPeakTable(world, 31 + i), `station${i + 1}.csv`)
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    ids.push(reply.body.id)
  }
})
afterAll(async () => { await browser?.close(); await closeTestDb() })

async function noSeriousViolations(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

async function shoot(target: Locator, name: string) {
  const dir = join(inject('root'), 'test-results', 'screenshots')
  mkdirSync(dir, { recursive: true })
  await target.scrollIntoViewIfNeeded()
  await target.screenshot({ path: join(dir, `${name}.png`) })
}

describe('sending a run back in Chromium', () => {
  it('the decision panel offers the new due time, prefilled, and the return keeps the one typed (1440 px)', async () => {
    const { page, context, problems } = await openTab(browser, DESKTOP)
    const ta = world.sections[0]!.ta
    await signInThroughPage(page, ta.email, ta.password)
    await page.goto(`/review/submissions/${ids[0]}`)
    const panel = page.getByRole('complementary', { name: 'Decision' })
    await panel.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    const due = page.getByLabel('New version due')
    // Prefilled with the course default: three days from today, at 23:59 on the course's clock.
    expect(await due.inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}T23:59$/)
    await page.getByText('Default: 3 days from today').waitFor()
    // The field shows the browser's date style; the hint reads it back in the product's one.
    await page.getByText(/^[A-Z][a-z]{2} \d{1,2} [A-Z][a-z]{2} \d{4}, 23:59, course time \(America\/Chicago\)/).waitFor()
    await noSeriousViolations(page)
    await screenshotFromTop(page, 'returns-decision-panel-desktop')

    await page.getByLabel('Reason for returning').fill(reason)
    const typed = new Date(Date.now() + 5 * 86_400_000).toISOString().slice(0, 10)
    await due.fill(`${typed}T17:00`)
    await page.getByRole('button', { name: 'Return for resubmission' }).click()
    await page.locator('[data-test="history-due"]').first().waitFor()
    await screenshotFromTop(page, 'returns-decision-panel-returned-desktop')
    const [review] = await testDb().selectFrom('reviews').select(['resubmitDueAt', 'reason']).where('submissionId', '=', ids[0]!).execute()
    expect(review!.reason).toBe(reason)
    expect(review!.resubmitDueAt).not.toBeNull()
    expect(problems).toEqual([])
    await context.close()
  })

  it('the decision panel at 820 px', async () => {
    const { page, context } = await openTab(browser, TABLET)
    const ta = world.sections[0]!.ta
    await signInThroughPage(page, ta.email, ta.password)
    await page.goto(`/review/submissions/${ids[1]}`)
    const panel = page.getByRole('complementary', { name: 'Decision' })
    await panel.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    await page.getByLabel('New version due').waitFor()
    await noSeriousViolations(page)
    await screenshotFromTop(page, 'returns-decision-panel-tablet')
    await context.close()
  })

  for (const [label, viewport] of [['desktop', DESKTOP], ['tablet', TABLET]] as const) {
    it(`the partner's page shows the run as sent back, with the reason and the new due time (${viewport.width} px)`, async () => {
      const { page, context, problems } = await openTab(browser, viewport)
      const partner = world.sections[0]!.students[1]!
      await signInThroughPage(page, partner.email, partner.password)
      await page.goto(`/practicals/${world.practicalId}/results`)
      const banner = page.locator('[data-test="sent-back"]')
      await banner.waitFor()
      await banner.getByText(reason).waitFor()
      await banner.getByText('Upload a new version by').waitFor()
      expect(await banner.textContent()).toMatch(/\d{2}:\d{2}/)
      await noSeriousViolations(page)
      await screenshotFromTop(page, `returns-student-page-${label}`)
      await shoot(banner, `returns-student-banner-${label}`)
      expect(problems).toEqual([])
      await context.close()
    })
  }
})
