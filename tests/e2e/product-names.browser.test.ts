import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { closeTestDb, createUser, testDb, TEST_PASSWORD } from '../support/db'
import { gcTable, makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import { signedIn } from '../support/http'

// Products by name and runs judged against the reference distribution, as people see them in
// Chromium: the window editor where an instructor names products, a student's result page and a
// TA's review of the same run. The practical is 1-chlorobutane with sulfuryl chloride, whose
// shared library entry carries the seeded reference 6 / 23 / 46 / 25 % (from memory).

let browser: Browser
let gc: GcPractical

beforeAll(async () => {
  browser = await launchBrowser()
  gc = await makeGcPractical({ substrate: '1-chlorobutane', reagent: 'so2cl2-azo', students: 2 })
})
afterAll(async () => {
  await browser?.close()
  await gc?.cleanup()
  await closeTestDb()
})

async function noSeriousViolations(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

describe('product names and the reference distribution in Chromium', () => {
  it('an instructor names a product in the window editor of their copy, and sees the reference distribution', async () => {
    const user = await createUser('instructor')
    const shared = await testDb().selectFrom('substrates').select('id').where('name', '=', '1-chlorobutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
    const copy = await (await signedIn(user.email, user.password)).post(`/api/substrates/${shared.id}/copy`)
    const { page, problems } = await openTab(browser)
    await signInThroughPage(page, user.email, user.password)
    await page.goto(`/library/substrates/${copy.body.id}`)
    const editor = page.locator('[data-test=window-table]')
    await editor.waitFor()
    const nameFields = editor.locator('input[data-test=product-name]')
    expect(await nameFields.count()).toBe(4)
    expect((await nameFields.evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value))).sort())
      .toEqual(['1,1-dichlorobutane', '1,2-dichlorobutane', '1,3-dichlorobutane', '1,4-dichlorobutane'])
    // Position b is the 1,3-position (the depiction letters CH3 a, then along the chain).
    const field = editor.getByLabel('Name of the product at position b', { exact: true })
    expect(await field.inputValue()).toBe('1,3-dichlorobutane')
    await field.fill('1,3-dichlorobutane (main product)')
    await page.locator('[data-test=save-windows]').click()
    await page.getByText('Windows and names saved').waitFor()
    await page.locator('[data-test=products-table]').getByText('1,3-dichlorobutane (main product)').waitFor()
    const stored = await testDb().selectFrom('substrateProductNames').select('name').where('substrateId', '=', copy.body.id).execute()
    expect(stored.map((r) => r.name)).toEqual(['1,3-dichlorobutane (main product)'])
    const reference = page.locator('[data-test=reference-editor]')
    expect(await reference.locator('input[data-test=reference-percent]').evaluateAll((els) => els.map((e) => Number((e as HTMLInputElement).value)).sort((a, b) => a - b)))
      .toEqual([6, 23, 25, 46])
    await reference.locator('[data-test=reference-fill]').waitFor()
    await noSeriousViolations(page)
    await screenshot(page, 'names-window-editor')
    expect(problems).toEqual([])
  })

  it('a student reads their flagged run by product name, compared with the reference distribution', async () => {
    const { page, problems } = await openTab(browser)
    await signInThroughPage(page, gc.students[0]!.email, TEST_PASSWORD)
    await page.goto(`/practicals/${gc.practicalId}/results`)
    // The class model's own mixture: 18 points away from the reference, so it is flagged.
    await page.getByLabel('Choose a GC file').setInputFiles({ name: 'run.csv', mimeType: 'text/csv', buffer: Buffer.from(gcTable(gc, { seed: 61 }).text) })
    const preview = page.locator('[data-test=gc-preview]')
    const far = preview.locator('[data-flag=far-from-prediction]')
    await far.waitFor()
    expect(await far.textContent()).toMatch(/reference distribution from H\. C\. Brown and A\. B\. Ash.*1,\d-dichlorobutane \(/)
    await preview.getByText('Your result is compared with the reference distribution from').waitFor()
    await preview.getByRole('columnheader', { name: 'Reference' }).waitFor()
    await preview.getByText('1,4-dichlorobutane').first().waitFor()
    await preview.getByText('Share of the starting material turned into dichlorides').waitFor({ state: 'attached' })
    await noSeriousViolations(page)
    await screenshot(page, 'names-student-preview')
    await preview.getByRole('button', { name: 'Confirm and submit' }).click()
    await page.locator('[data-test=gc-stored]').getByRole('heading', { name: 'Submitted as version 1' }).waitFor()
    await page.locator('[data-test=gc-stored] [data-flag=far-from-prediction]').waitFor()
    await screenshot(page, 'names-student-stored')
    expect(problems).toEqual([])
  })

  it('the TA reviews the same run with names in the flags, peaks and distribution', async () => {
    const other = await gc.signIn(gc.students[1]!)
    // A second run missing a product, so a flag names the product that is not there.
    const reply = await uploadGc(other, gc.practicalId, gcTable(gc, { seed: 62, fault: 'missing-product', faultProduct: 2 }).text)
    expect(reply.status).toBe(201)
    const { page, problems } = await openTab(browser)
    await signInThroughPage(page, gc.ta.email, TEST_PASSWORD)
    await page.goto(`/review/submissions/${reply.body.id}`)
    const missing = page.locator('[data-flag=missing-product]')
    await missing.waitFor()
    expect(await missing.textContent()).toMatch(/No peak was found for 1,\d-dichlorobutane \(C/)
    await page.locator('[data-test=compared-with]').getByText(/compare this run with the reference distribution from/).waitFor()
    await page.getByRole('columnheader', { name: 'Reference' }).waitFor()
    expect(await page.getByText('1,2-dichlorobutane').count()).toBeGreaterThan(1)
    await noSeriousViolations(page)
    await screenshot(page, 'names-review-detail')
    expect(problems).toEqual([])
  })
})
