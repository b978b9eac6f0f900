import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage } from '../support/browser'
import { DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { deleteSubmissions, gcTable, type GcPractical } from '../support/gc'
import { analyzeSubstrate, predictDistribution } from '../../shared/utils/halogenation'

// A student goes from GC export to a computed, flagged result in one page, in Chromium: the
// demo practical 2 (2,3-dimethylbutane, chlorine and light; it meets next week and has no
// submissions), as student01 (section M1, station 1, with student02).

let browser: Browser
let practicalId: number
let chemistry: Pick<GcPractical, 'windows' | 'truth' | 'solvent' | 'startingMaterial'>
let studentIds: number[]
const started = new Date()

beforeAll(async () => {
  browser = await launchBrowser()
  const db = testDb()
  const practical = await db.selectFrom('practicals').innerJoin('methods', 'methods.id', 'practicals.methodId')
    .innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .select(['practicals.id', 'substrates.id as substrateId', 'substrates.smiles', 'methods.rPrimary', 'methods.rSecondary', 'methods.rTertiary'])
    .where('practicals.title', '=', 'Photochlorination of 2,3-dimethylbutane').executeTakeFirstOrThrow()
  practicalId = practical.id
  const analysis = analyzeSubstrate(practical.smiles)
  const windows = await db.selectFrom('substrateWindows').selectAll().where('substrateId', '=', practical.substrateId).orderBy('rtMin').execute()
  const ref = (kind: string) => windows.filter((w) => w.kind === kind).map((w) => ({ rtMin: w.rtMin, rtMax: w.rtMax }))[0] ?? null
  chemistry = {
    windows: windows.filter((w) => w.kind === 'product').map((w) => ({ productSmiles: w.productSmiles!, rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor })),
    truth: predictDistribution(analysis, {
      primary: practical.rPrimary,
      secondary: practical.rSecondary,
      tertiary: practical.rTertiary,
    }).map((p) => ({ smiles: p.smiles, percent: p.percent })),
    solvent: ref('solvent'),
    startingMaterial: ref('starting-material'),
  }
  studentIds = (await db.selectFrom('users').select('id').where('email', 'in', [DEMO.student(1), DEMO.student(2)]).execute()).map((u) => u.id)
})

afterAll(async () => {
  await browser?.close()
  // Leave the demo practical as it was: without submissions.
  if (practicalId) {
    await deleteSubmissions(testDb().selectFrom('submissions').select('id')
      .where('practicalId', '=', practicalId).where('submittedBy', 'in', studentIds).where('createdAt', '>=', started))
  }
  await closeTestDb()
})

async function noSeriousViolations(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

/** Full-page screenshots from the top, so the sticky header does not land mid-page. */
async function topShot(page: Page, name: string) {
  await page.evaluate(() => window.scrollTo(0, 0))
  await screenshot(page, name)
}

/** Drops a file on the zone as a desktop browser would (a DataTransfer carrying a File). */
async function dropFile(page: Page, name: string, text: string) {
  const transfer = await page.evaluateHandle(({ name, text }) => {
    const data = new DataTransfer()
    data.items.add(new File([text], name, { type: 'text/csv' }))
    return data
  }, { name, text })
  const zone = page.locator('[data-test=gc-drop]')
  await zone.dispatchEvent('dragenter', { dataTransfer: transfer })
  await zone.dispatchEvent('dragover', { dataTransfer: transfer })
  await zone.dispatchEvent('drop', { dataTransfer: transfer })
}

describe('GC results page in Chromium', () => {
  it('a student uploads, reads the flagged preview, confirms, resubmits and reads the history, on a desktop and a phone', async () => {
    const tab = await openTab(browser, { width: 1280, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.student(1))

    // From My lab, the practical's "Results" button.
    await page.goto('/')
    await page.locator('li').filter({ hasText: 'Photochlorination of 2,3-dimethylbutane' }).getByRole('link', { name: 'Results' }).click()
    await page.waitForURL(new RegExp(`/practicals/${practicalId}/results$`))
    await page.getByRole('heading', { name: 'GC results', level: 1 }).waitFor()
    await page.getByText('Nothing submitted yet').waitFor()
    await page.getByText('Chlorine gas').waitFor()
    await noSeriousViolations(page)
    await topShot(page, 'gc-results-empty')

    // The file input is a real, focusable control (keyboard: Tab to it, Enter opens the chooser).
    const input = page.getByLabel('Choose a GC file')
    await input.focus()
    expect(await input.evaluate((el) => el === document.activeElement)).toBe(true)

    // A slow line, so the progress bar can be seen while the bytes go out.
    const cdp = await tab.context.newCDPSession(page)
    await cdp.send('Network.enable')
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 8 * 1024 })
    const flagged = gcTable(chemistry, { seed: 51, fault: 'split-peak', faultProduct: 1 }).text
    const padded = `${flagged}\n${'\n'.repeat(20_000)}`
    await input.setInputFiles({ name: 'run-1.csv', mimeType: 'text/csv', buffer: Buffer.from(padded) })
    const progress = page.locator('[data-test=upload-progress]')
    await progress.waitFor()
    expect(await progress.getByRole('progressbar').count()).toBe(1)
    await topShot(page, 'gc-results-progress')
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 })

    // The preview: peaks with their assignment, mole %, factors and every flag.
    const preview = page.locator('[data-test=gc-preview]')
    await preview.getByRole('heading', { name: 'Check the result before you submit' }).waitFor()
    await preview.locator('[data-flag=split-peak]').waitFor()
    await preview.locator('[data-flag=split-peak]').getByText('Check', { exact: true }).waitFor()
    await preview.getByText('3°:1° selectivity').waitFor()
    await preview.getByRole('cell', { name: 'solvent' }).waitFor()
    await preview.getByRole('cell', { name: /^product a/ }).first().waitFor()
    await preview.locator('canvas').waitFor()
    expect(await testDb().selectFrom('submissions').select('id').where('practicalId', '=', practicalId).where('submittedBy', 'in', studentIds).where('createdAt', '>=', started).execute()).toEqual([])
    await noSeriousViolations(page)
    await topShot(page, 'gc-results-preview-desktop')

    // Confirm: the stored version, computed again by the server.
    await preview.getByRole('button', { name: 'Confirm and submit' }).click()
    const stored = page.locator('[data-test=gc-stored]')
    await stored.getByRole('heading', { name: 'Submitted as version 1' }).waitFor()
    await stored.getByText('Waiting for review').waitFor()
    await stored.locator('[data-flag=split-peak]').waitFor()
    await noSeriousViolations(page)
    await topShot(page, 'gc-results-stored')

    // A corrected export, dropped on the zone: version 2; version 1 stays in the history.
    await dropFile(page, 'run-2-reintegrated.csv', gcTable(chemistry, { seed: 52 }).text)
    await preview.getByText('No flags: the peaks fit the retention windows').waitFor()
    await preview.getByRole('button', { name: 'Confirm and submit' }).click()
    await stored.getByRole('heading', { name: 'Submitted as version 2' }).waitFor()
    const history = page.locator('[data-test=gc-history]')
    await history.locator('[data-test=version-1]').getByText('run-1.csv').waitFor()

    // A TA returns version 1 (made here through the database; the review side has its own test).
    const first = await testDb().selectFrom('submissions').select('id').where('practicalId', '=', practicalId)
      .where('version', '=', 1).where('submittedBy', 'in', studentIds).where('createdAt', '>=', started).executeTakeFirstOrThrow()
    const ta = await testDb().selectFrom('users').select('id').where('email', '=', DEMO.ta1).executeTakeFirstOrThrow()
    await testDb().insertInto('reviews').values({ submissionId: first.id, reviewerId: ta.id, decision: 'return', reason: 'Product b shows as two peaks: integrate it as one and upload again.', scores: '{}' }).execute()
    await testDb().updateTable('submissions').set({ status: 'returned' }).where('id', '=', first.id).execute()
    await page.reload()
    await history.locator('[data-test=version-1]').getByText('Returned for resubmission').first().waitFor()
    await history.locator('[data-test=return-reason]').getByText(/Product b shows as two peaks/).waitFor()
    await noSeriousViolations(page)
    await topShot(page, 'gc-results-history-desktop')

    // The whole flow on a phone: nothing wider than the screen; tables scroll in their own box.
    await page.setViewportSize({ width: 390, height: 844 })
    await dropFile(page, 'run-3.csv', gcTable(chemistry, { seed: 53, extraPeaks: [{ retentionTime: 6.5, area: 60_000 }] }).text)
    await preview.locator('[data-flag=unassigned-area]').waitFor()
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await noSeriousViolations(page)
    await topShot(page, 'gc-results-preview-phone')
    await preview.getByRole('button', { name: 'Choose another file' }).click()
    await preview.waitFor({ state: 'detached' })
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await topShot(page, 'gc-results-history-phone')
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('the partner sees the same versions, and the procedure card links to the page', async () => {
    const tab = await openTab(browser, { width: 1100, height: 900 })
    const { page } = tab
    await signInThroughPage(page, DEMO.student(2))
    await page.goto(`/practicals/${practicalId}`)
    await page.getByRole('link', { name: 'Upload GC results' }).click()
    await page.waitForURL(new RegExp(`/practicals/${practicalId}/results$`))
    const history = page.locator('[data-test=gc-history]')
    await history.locator('[data-test=version-2]').waitFor()
    await history.locator('[data-test=version-1]').getByText(/uploaded by [A-Z]/).waitFor()
    expect(await history.getByText('uploaded by you').count()).toBe(0)
    await noSeriousViolations(page)
    expect(tab.problems).toEqual([])
    await tab.context.close()
  })

  it('staff are not sent to the student page', async () => {
    const tab = await openTab(browser)
    await signInThroughPage(tab.page, DEMO.ta1)
    const response = await tab.page.goto(`/practicals/${practicalId}/results`)
    expect(response?.status()).toBe(403)
    await tab.context.close()
  })
})
