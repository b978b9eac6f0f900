import { readFile } from 'node:fs/promises'
import Papa from 'papaparse'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { describeViolations, expectNoSidewaysScroll, launchBrowser, screenshotFromTop, seriousViolations } from '../support/browser'
import { closeTestDb } from '../support/db'
import { makeCourse, registrarRoster } from './fixtures/rosters/course'
import { csvFile, openRosterTab } from './fixtures/rosters/roster-page'

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

async function accessible(page: Page) {
  const violations = await seriousViolations(page)
  expect(violations, describeViolations(violations)).toEqual([])
}

describe('a roster import that skips bad rows, in Chromium', () => {
  for (const width of [1440, 820]) {
    it(`at ${width} px: imports 28, lists the 4 skipped, takes them back once fixed, and finds a student by id`, async () => {
      const { course, instructor } = await makeCourse()
      const roster = registrarRoster(`w${width}.example`)
      const { tab, page, picker } = await openRosterTab(browser, width, instructor, course.id)

      // The button says what it will do; the bad rows are marked in the preview.
      await picker.setInputFiles(csvFile('registrar.csv', roster.csv))
      const importButton = page.getByRole('button', { name: 'Import 28 students, skip 4 rows' })
      await importButton.waitFor()
      expect(await importButton.isDisabled()).toBe(false)
      await page.getByText('No section “Z9” in this course').waitFor()
      await accessible(page)
      await expectNoSidewaysScroll(page)
      await screenshotFromTop(page, `roster-skip-preview-${width}`)

      await importButton.click()
      const skipped = page.locator('[data-test="roster-skipped"]')
      await skipped.getByRole('heading', { name: '4 rows skipped' }).waitFor()
      const listed = await skipped.getByRole('listitem').allInnerTexts()
      expect(listed.map((t) => t.replace(/\s+/g, ' '))).toEqual([
        expect.stringMatching(/^Row 5 .*Not an e-mail address$/),
        expect.stringMatching(/^Row 12 .*No section “Z9” in this course$/),
        expect.stringMatching(/^Row 20 .*No name$/),
        expect.stringMatching(/^Row 27 .*Same student ID as row 2$/),
      ])
      await accessible(page)
      await screenshotFromTop(page, `roster-skip-result-${width}`)

      // Download the skipped rows, fix them as an instructor would, and choose the file again.
      const [download] = await Promise.all([page.waitForEvent('download'), skipped.getByRole('link', { name: /Skipped rows/ }).click()])
      const [header, ...rows] = Papa.parse<string[]>((await readFile((await download.path())!, 'utf8')).replace(/^\uFEFF/, ''),
        { skipEmptyLines: true }).data
      expect(header).toEqual(['Row', 'Student ID', 'Name', 'E-mail', 'Section', 'Reason'])
      const original = new Map(roster.bad.map((s) => [String(s.row), s]))
      const fixed = Papa.unparse([header!, ...rows.map((r) => {
        const s = original.get(r[0]!)!
        return [r[0]!, s.studentId, `${s.first} ${s.last}`, s.email, s.section, r[5]!]
      })])
      await picker.setInputFiles(csvFile('skipped-fixed.csv', fixed))
      const again = page.getByRole('button', { name: 'Import 4 students' })
      await again.waitFor()
      await again.click()
      await page.getByText('Roster imported').last().waitFor()
      expect(await page.locator('[data-test="roster-skipped"]').count()).toBe(0)

      // The roster shows the student ids, and the search box finds a student by theirs.
      const wanted = roster.bad[1]! // row 12, whose section was wrong
      await page.getByRole('tab', { name: new RegExp(`^${wanted.section}`) }).click()
      const search = page.getByLabel('Find a student')
      await search.fill(wanted.studentId)
      await expect.poll(() => page.getByRole('cell', { name: `${wanted.first} ${wanted.last}`, exact: true }).count()).toBe(1)
      await page.getByRole('cell', { name: wanted.studentId, exact: true }).waitFor()
      await page.getByText('1 matching row').waitFor()
      await accessible(page)
      await screenshotFromTop(page, `roster-search-by-id-${width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    })
  }
})
