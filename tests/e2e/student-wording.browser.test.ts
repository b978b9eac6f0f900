import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { REVIEW_FLAG_NAMES } from '../../shared/types/review'
import { launchBrowser, openTab, screenshot, signInThroughPage } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { DEMO } from '../support/http'
import { makeReviewWorld, reviewPeakTable, signInAs, uploadAs, type ReviewWorld } from '../support/review'

// What a student reads speaks to people: no flag codes in parentheses such as "(missing-product)",
// and no "from memory" notes of ours on a source line. The world's method carries an
// instructor's source that ends in "from memory" and the shared reference distribution is one
// recalled from memory (its kind says so), so both notes are there to leak if a page lets them.

let browser: Browser
let world: ReviewWorld
const FLAG_CODE = new RegExp(`\\((?:${Object.keys(REVIEW_FLAG_NAMES).join('|')})\\)`)
const MEMORY = /from memory/i
const clean = (label: string, text: string) => {
  expect(text, `${label} shows a flag code`).not.toMatch(FLAG_CODE)
  expect(text, `${label} shows "from memory"`).not.toMatch(MEMORY)
}

beforeAll(async () => {
  browser = await launchBrowser()
  world = await makeReviewWorld({ sections: 1, studentsPerSection: 4 })
  const db = testDb()
  const practical = await db.selectFrom('practicals').select('methodId').where('id', '=', world.practicalId).executeTakeFirstOrThrow()
  const shared = await db.selectFrom('methods').selectAll().where('id', '=', practical.methodId).executeTakeFirstOrThrow()
  const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = shared
  const own = await db.insertInto('methods').values({ ...rest, name: 'Sulfuryl chloride, our bench', ownerId: world.owner.id, source: 'Textbook value, from memory' })
    .returning('id').executeTakeFirstOrThrow()
  await db.updateTable('practicals').set({ methodId: own.id }).where('id', '=', world.practicalId).execute()
  const [first, , third] = world.sections[0]!.students
  // Station 1 lost a product peak (a flag the student reads); station 2 a good run.
  expect((await uploadAs(await signInAs(first!), world.practicalId, reviewPeakTable(world, 31, { fault: 'missing-product' }), 's1.csv')).status).toBe(201)
  expect((await uploadAs(await signInAs(third!), world.practicalId, reviewPeakTable(world, 32), 's2.csv')).status).toBe(201)
})
afterAll(async () => { await browser?.close(); await closeTestDb() })

describe('student-facing words', () => {
  it('the student JSON carries the flag as data, its words without the code, and sources as references', async () => {
    const student = await signInAs(world.sections[0]!.students[0]!)
    const mine = await student.get(`/api/practicals/${world.practicalId}/my-submissions`)
    expect(mine.status).toBe(200)
    const json = JSON.stringify(mine.body)
    // The flag is there (as a key), so the check below has something to catch.
    expect(json).toContain('"code":"missing-product"')
    expect(json).toMatch(/reference distribution from H\. C\. Brown and A\. B\. Ash/)
    clean('my-submissions', json)
    const detail = await student.get(`/api/practicals/${world.practicalId}`)
    expect(detail.status).toBe(200)
    expect(JSON.stringify(detail.body)).toContain('Textbook value')
    clean('practical detail', JSON.stringify(detail.body))
  })

  it('the student pages and the student digest read as references, with no codes', async () => {
    const who = world.sections[0]!.students[0]!
    for (const width of [1440, 820]) {
      const tab = await openTab(browser, { width, height: 1000 })
      await signInThroughPage(tab.page, who.email, who.password)
      await tab.page.goto(`/practicals/${world.practicalId}/results`)
      // Attached (it may sit in a folded version), and read with hidden text too.
      await tab.page.locator('[data-flag="missing-product"]').first().waitFor({ state: 'attached' })
      clean(`results page at ${width}`, await tab.page.evaluate(() => document.body.textContent ?? ''))
      await screenshot(tab.page, `student-wording-results-${width}`)
      await tab.page.goto(`/practicals/${world.practicalId}`)
      await tab.page.getByText(/Sulfuryl chloride, our bench/).first().waitFor()
      clean(`practical page at ${width}`, await tab.page.evaluate(() => document.body.textContent ?? ''))
      await screenshot(tab.page, `student-wording-practical-${width}`)
      await tab.context.close()
    }

    const owner = await signInAs(world.owner)
    const preview = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[0]!.id}&audience=student&userId=${who.id}`)
    expect(preview.status).toBe(200)
    const csv = Buffer.from(preview.body.attachments[0]!.content, 'base64').toString('utf8')
    expect(preview.body.text).toMatch(/Reference value: [\d.]+ \(Sulfuryl chloride, our bench at \d+ °C: Textbook value\)/)
    expect(csv).toContain('missing product')
    for (const [label, text] of [['digest text', preview.body.text], ['digest html', preview.body.html], ['digest csv', csv]] as const) {
      clean(label, text)
      expect(text).not.toContain('missing-product')
    }
  })

  it('the home page’s safety box is the next practical’s own: chlorine for the demo class’s Cl2-and-light practical, once', async () => {
    // Demo scenario (PRODUCT.md): practical 1 (sulfuryl chloride) has met; practical 2 is the photochlorination.
    for (const width of [1440, 820]) {
      const tab = await openTab(browser, { width, height: 1000 })
      await signInThroughPage(tab.page, DEMO.student(8))
      await tab.page.goto('/')
      const box = tab.page.locator('[data-test="safety-cautions"]')
      await box.first().waitFor()
      expect(await box.count()).toBe(1)
      expect((await box.getAttribute('data-hazards'))!.split(' ')).toEqual(['chlorine', 'light-source', 'halogenated-waste'])
      expect(await box.innerText()).toMatch(/Safety for Photochlorination of 2,3-dimethylbutane \(Chlorine and light\)/)
      expect(await box.innerText()).not.toMatch(/sulfuryl/i)
      // Below the lab details and the practicals: it never pushes the main task down.
      const practicals = await tab.page.getByRole('heading', { name: 'Practicals' }).boundingBox()
      expect((await box.boundingBox())!.y).toBeGreaterThan(practicals!.y)
      await screenshot(tab.page, `student-home-safety-${width}`)
      await tab.context.close()
    }
  })
})
