import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { makeReviewWorld, reviewPeakTable, signInAs, uploadAs, type ReviewWorld } from '../support/review'

let browser: Browser
let world: ReviewWorld
const ids: number[] = []
const TABLET = { width: 820, height: 1180 }

beforeAll(async () => {
  browser = await launchBrowser()
  world = await makeReviewWorld({ sections: 1, studentsPerSection: 8 })
  const students = world.sections[0]!.students
  // Station 1 counted the solvent as a product (in the window of 1,4-dichlorobutane, lifting it far
  // above its expected share, so the flag blocks acceptance); station 2 lost a product peak (a warning);
  // stations 3 and 4 are good runs. Uploaded in that order, through the public route.
  const runs = [
    { by: students[0]!, text: reviewPeakTable(world, 21, { fault: 'solvent-as-product', faultSmiles: 'ClCCCCCl' }), name: 'station1.csv' },
    { by: students[2]!, text: reviewPeakTable(world, 22, { fault: 'missing-product' }), name: 'station2.csv' },
    { by: students[4]!, text: reviewPeakTable(world, 23), name: 'station3.csv' },
    { by: students[6]!, text: reviewPeakTable(world, 24), name: 'station4.csv' },
  ]
  for (const run of runs) {
    const reply = await uploadAs(await signInAs(run.by), world.practicalId, run.text, run.name)
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    ids.push(reply.body.id)
  }
  // A second practical in the same section that nobody has uploaded to: named in one line, not a card.
  const first = await testDb().selectFrom('practicals').select(['courseId', 'substrateId', 'methodId']).where('id', '=', world.practicalId).executeTakeFirstOrThrow()
  const quiet = await testDb().insertInto('practicals').values({ ...first, title: 'Nothing uploaded yet', workUnit: 'pair' })
    .returning('id').executeTakeFirstOrThrow()
  await testDb().insertInto('practicalSessions')
    .values({ practicalId: quiet.id, sectionId: world.sections[0]!.id, meetingDate: '2026-11-02', dueAt: '2099-01-01T00:00:00Z' }).execute()
})
afterAll(async () => { await browser?.close(); await closeTestDb() })

async function noSeriousViolations(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

describe('a TA works the queue in Chromium', () => {
  const reason = 'The solvent came out inside the window of product a and was counted as product. Integrate again without it and upload the new table.'

  it('opens the top flagged submission and returns it with a reason; the student reads it', async () => {
    const tab = await openTab(browser, { width: 1366, height: 900 })
    const { page } = tab
    await signInThroughPage(page, world.sections[0]!.ta.email, world.sections[0]!.ta.password)
    await page.goto('/review')
    await page.getByRole('heading', { name: 'Review GC results' }).waitFor()
    await page.getByText('4 results are waiting for review.').waitFor()
    // The list names the term and shows only practicals with uploads, as its text says.
    expect(await page.locator('[data-test="review-terms"]').innerText()).toBe('Test term')
    expect(await page.locator('[data-test="review-practical"]').count()).toBe(1)
    expect(await page.locator('[data-test="no-uploads-yet"]').innerText()).toMatch(/^No uploads yet: Nothing uploaded yet \(REV \w+, Test term\)\.$/)
    await noSeriousViolations(page)
    await screenshot(page, 'review-practicals')
    await page.getByRole('link', { name: /Open the queue for Review practical/ }).click()
    await page.waitForURL(/\/review\/practicals\/\d+/)

    // The queue: blocking flags first (oldest first), clean runs last, with checkboxes.
    const rows = page.locator('[data-test="table-row"]')
    await rows.first().waitFor()
    expect(await rows.count()).toBe(4)
    await expect.poll(() => rows.first().locator('[data-flag="solvent-counted"]').count()).toBe(1)
    expect(await page.getByRole('checkbox', { name: /Choose .* for bulk acceptance/ }).count()).toBe(2)
    await noSeriousViolations(page)
    await screenshot(page, 'review-queue-desktop')

    await rows.first().getByRole('link').click()
    await page.waitForURL(new RegExp(`/review/submissions/${ids[0]}$`))
    await page.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    await page.getByText('This run has a blocking flag').waitFor()
    await page.locator('canvas').first().waitFor()
    await noSeriousViolations(page)
    await screenshot(page, 'review-detail-desktop')

    // A return without a reason is stopped beside the field, by the route's own schema.
    await page.getByRole('button', { name: 'Return for resubmission' }).click()
    await page.getByText('Say why it is returned, so the student can fix it').waitFor()
    await page.getByLabel('Reason for returning').fill(reason)
    await page.getByRole('button', { name: 'Return for resubmission' }).click()
    await page.getByText('Decision saved').waitFor()
    await page.getByText('Reason: The solvent came out').waitFor()
    await page.evaluate(() => window.scrollTo(0, 0))
    await screenshot(page, 'review-detail-returned-desktop')
    const stored = await testDb().selectFrom('submissions').select('status').where('id', '=', ids[0]!).executeTakeFirstOrThrow()
    expect(stored.status).toBe('returned')
    // "Next in queue" goes on to station 2's flagged run.
    await page.getByRole('link', { name: /Next in queue/ }).click()
    await page.waitForURL(new RegExp(`/review/submissions/${ids[1]}$`))
    await page.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    expect(tab.problems).toEqual([])
    await tab.context.close()

    // The student (the uploader's partner) sees the reason on their results page.
    const student = await openTab(browser, { width: 1280, height: 900 })
    const partner = world.sections[0]!.students[1]!
    await signInThroughPage(student.page, partner.email, partner.password)
    await student.page.goto(`/practicals/${world.practicalId}/results`)
    await student.page.getByText(reason).first().waitFor()
    await noSeriousViolations(student.page)
    await screenshot(student.page, 'review-student-sees-reason')
    const mine = await (await signInAs(partner)).get(`/api/practicals/${world.practicalId}/my-submissions`)
    expect(JSON.stringify(mine.body)).toContain(reason)
    expect(student.problems).toEqual([])
    await student.context.close()
  })

  it('works at the bench on a tablet (820 × 1180): queue, detail and bulk accept', async () => {
    const tab = await openTab(browser, TABLET)
    const { page } = tab
    await signInThroughPage(page, world.sections[0]!.ta.email, world.sections[0]!.ta.password)
    await page.goto(`/review/practicals/${world.practicalId}`)
    await page.locator('[data-test="table-row"]').first().waitFor()
    await noSeriousViolations(page)
    await screenshot(page, 'review-queue-tablet')
    // No sideways scrolling of the page itself on the tablet.
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true)

    await page.goto(`/review/submissions/${ids[2]}`)
    await page.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    await page.getByText(/Suggested by the course’s rule/).first().waitFor()
    await noSeriousViolations(page)
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true)
    await screenshot(page, 'review-detail-tablet')

    // One action chooses every run with no warnings (the two clean ones, not station 2's warning), then bulk accept.
    await page.goto(`/review/practicals/${world.practicalId}`)
    await page.getByRole('button', { name: 'Choose every run with no warnings (2)' }).click()
    const boxes = page.getByRole('checkbox', { name: /for bulk acceptance/ })
    expect(await boxes.count()).toBe(2)
    for (const box of await boxes.all()) expect(await box.isChecked()).toBe(true)
    await page.getByRole('button', { name: 'Accept chosen (2)' }).click()
    await page.getByRole('button', { name: 'Accept 2' }).click()
    await page.getByText('2 accepted, parts left to mark').waitFor()
    const accepted = await testDb().selectFrom('submissions').select('id').where('id', 'in', [ids[2]!, ids[3]!]).where('status', '=', 'accepted').execute()
    expect(accepted).toHaveLength(2)
    // The parts a person reads were not invented: they wait, and the queue says so.
    const reviews = await testDb().selectFrom('reviews').select(['scores', 'total']).where('submissionId', 'in', [ids[2]!, ids[3]!]).execute()
    for (const r of reviews) {
      expect(r.total).toBeNull()
      expect(Object.keys(r.scores as object)).toEqual(['accuracy'])
    }
    await expect.poll(() => page.locator('[data-test="to-mark"]').count()).toBe(2)
    await noSeriousViolations(page)
    await screenshot(page, 'review-queue-after-bulk-tablet')
    await page.goto(`/review/submissions/${ids[2]}`)
    await page.getByText(/Calculation and discussion: to mark/).first().waitFor()
    await screenshot(page, 'review-detail-to-mark-tablet')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('at 1440 and 820 px: every nav destination in sight, chromatogram log scale and zoom, the decision in reach', async () => {
    for (const viewport of [{ width: 1440, height: 900 }, TABLET]) {
      const tab = await openTab(browser, viewport)
      const { page } = tab
      await signInThroughPage(page, world.owner.email, world.owner.password)
      await page.goto(`/review/submissions/${ids[1]}`)
      await page.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
      // The navigation: no item scrolled out of sight, each fully inside the window.
      const nav = page.getByRole('navigation', { name: 'Main' }).first()
      const links = nav.getByRole('link')
      expect(await links.count()).toBeGreaterThan(3)
      expect(await nav.locator('ul').evaluate((ul) => ul.scrollWidth <= ul.clientWidth)).toBe(true)
      for (const link of await links.all()) {
        const box = (await link.boundingBox())!
        expect(box.x).toBeGreaterThanOrEqual(0)
        expect(box.x + box.width).toBeLessThanOrEqual(viewport.width)
      }
      // The chromatogram: a log area scale and a zoom to one window.
      const chart = page.locator('[data-test="chromatogram"]')
      await chart.locator('canvas').waitFor()
      expect(await chart.getAttribute('data-scale')).toBe('linear')
      await page.getByLabel('Log area scale').check()
      expect(await chart.getAttribute('data-scale')).toBe('log')
      const zoom = page.getByLabel('Zoom to')
      const firstWindow = (await zoom.locator('option').nth(1).getAttribute('value'))!
      await zoom.selectOption(firstWindow)
      expect(await chart.getAttribute('data-zoom')).toBe(firstWindow)
      await chart.scrollIntoViewIfNeeded()
      await screenshot(page, `review-chromatogram-log-zoom-${viewport.width}`)
      // The decision: beside the page at 1440; one tap away from anywhere at 820.
      const jump = page.locator('[data-test="to-decision"]')
      if (viewport.width >= 1024) {
        expect(await jump.isVisible()).toBe(false)
      } else {
        await page.evaluate(() => window.scrollTo(0, 0))
        expect(await jump.isVisible()).toBe(true)
        const box = (await jump.boundingBox())!
        expect(box.y + box.height).toBeLessThanOrEqual(viewport.height)
        await jump.click()
        await expect.poll(() => page.getByRole('button', { name: 'Return for resubmission' }).evaluate((b) => {
          const r = b.getBoundingClientRect()
          return r.top >= 0 && r.bottom <= window.innerHeight
        })).toBe(true)
        await screenshot(page, 'review-decision-in-reach-820')
      }
      expect(tab.problems).toEqual([])
      await tab.context.close()
    }
  })

  it('reads the demo term’s practical 1 queue (seeded runs; nothing changed)', async () => {
    const p1 = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()
    const tab = await openTab(browser, { width: 1366, height: 900 })
    const { page } = tab
    await signInThroughPage(page, 'ta1@larkspur.example')
    await page.goto(`/review/practicals/${p1.id}`)
    const rows = page.locator('[data-test="table-row"]')
    await rows.first().waitFor()
    // ta1 reviews M1 and W1 only (PRODUCT.md demo scenario).
    expect(await page.getByText('Section T1 ·').count()).toBe(0)
    await noSeriousViolations(page)
    await screenshot(page, 'review-demo-queue-desktop')
    await rows.first().getByRole('link').click()
    await page.getByRole('heading', { name: 'Decision', exact: true }).waitFor()
    await page.locator('canvas').first().waitFor()
    await noSeriousViolations(page)
    await screenshot(page, 'review-demo-detail-desktop')
    await page.setViewportSize(TABLET)
    await screenshot(page, 'review-demo-detail-tablet')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })
})
