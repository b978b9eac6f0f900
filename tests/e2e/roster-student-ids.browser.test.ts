import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { expectAccessible, expectNoSidewaysScroll, launchBrowser, screenshotFromTop } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { makeCourse, upload } from './fixtures/rosters/course'
import { csvFile, openRosterTab } from './fixtures/rosters/roster-page'

// The roster import page when the registrar's list brings ids for students already enrolled:
// the button and the outcome say the ids are added; a changed id waits for the instructor's tick.
// At 820 px the preview (with a long name and address) must not widen the page.

let browser: Browser
beforeAll(async () => { browser = await launchBrowser() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

const idsOf = (courseId: number) => testDb().selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
  .select(['users.email', 'enrollments.studentId']).where('enrollments.courseId', '=', courseId).orderBy('users.email').execute()
  .then((rows) => rows.map((r) => `${r.email.split('@')[0]} ${r.studentId ?? '-'}`))

describe('re-importing a roster with student ids, in Chromium', () => {
  for (const width of [1440, 820]) {
    it(`at ${width} px: adds the ids, then replaces a changed one only once it is ticked`, async () => {
      const { course, instructor, client } = await makeCourse()
      const domain = `ids${width}.example`
      const people = [['Maren Ashgrove', 'A1'], ['Tobiah Cinderford', 'A1'], ['Wrenna Dunmere', 'B1']] as const
      const rows = (ids: string[]) => people.map(([name, section], i) =>
        `${ids[i]},${name.toLowerCase().replace(' ', '.')}@${domain},${name},${section}`)
      expect((await upload(client, `/api/courses/${course.id}/roster/import`,
        ['Email,Name,Section', ...rows(['', '', '']).map((r) => r.slice(1))].join('\n'))).status).toBe(201)

      const { tab, page, picker } = await openRosterTab(browser, width, instructor, course.id)

      // The same three students, now with the id column: the button offers to add the ids.
      await picker.setInputFiles(csvFile('with-ids.csv', ['Student ID,Email,Name,Section', ...rows(['LS7001', 'LS7002', 'LS7003'])].join('\n')))
      const add = page.getByRole('button', { name: 'Add 3 student ids' })
      await add.waitFor()
      await page.getByText('student id added').first().waitFor()
      await expectNoSidewaysScroll(page)
      await add.click()
      await page.getByText('Imported: 3 already there, 3 student ids added.').waitFor()
      expect(await idsOf(course.id)).toEqual([`maren.ashgrove LS7001`, `tobiah.cinderford LS7002`, `wrenna.dunmere LS7003`])

      // The registrar corrected Tobiah's id, and a new student with a long name and address joins.
      const long = 'Anastasia-Perpetua Featherstonehaugh-Brackwater'
      const longEmail = `anastasia-perpetua.featherstonehaugh-brackwater.second-year@${domain}`
      await picker.setInputFiles(csvFile('corrected.csv', ['Student ID,Email,Name,Section', ...rows(['LS7001', 'LS7092', 'LS7003']),
        `LS7004,${longEmail},${long},B1`].join('\n')))
      const changes = page.locator('[data-test="roster-id-changes"]')
      await changes.getByRole('heading', { name: '1 student id in this file differs from the roster' }).waitFor()
      await page.getByRole('button', { name: 'Import 1 student' }).waitFor()
      await expectNoSidewaysScroll(page)
      await expectAccessible(page)
      await screenshotFromTop(page, `roster-id-changes-${width}`)
      await changes.getByLabel('Tobiah Cinderford (row 3): replace LS7002 with LS7092').check()
      await page.getByRole('button', { name: 'Import 1 student, replace 1 student id' }).click()
      await page.getByText('Imported: 1 new account invited, 3 already there, 1 student id replaced.').waitFor()
      expect(await idsOf(course.id)).toEqual([
        `${longEmail.split('@')[0]} LS7004`, `maren.ashgrove LS7001`, `tobiah.cinderford LS7092`, `wrenna.dunmere LS7003`,
      ])
      await expectNoSidewaysScroll(page)
      await screenshotFromTop(page, `roster-id-replaced-${width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    })
  }
})
