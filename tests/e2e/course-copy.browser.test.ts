import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { chromium, type Browser } from 'playwright-core'
import {
  describeViolations, expectNoSidewaysScroll, launchBrowser, openTab, screenshot, seriousViolations, signInThroughPage,
} from '../support/browser'
import { closeTestDb, createUser, TEST_PASSWORD, testDb } from '../support/db'
import { gcTable, makeGcPractical, uploadGc, type GcPractical } from '../support/gc'

// Copying a course into a new term through the real server and database, and the new-course
// form's time zone. Weekdays are read with the platform's Date (0 = Sunday), not our date code.
const weekdayOf = (date: string) => new Date(`${date}T12:00:00Z`).getUTCDay()
const spring = { term: 'Spring 2027', start: '2027-01-11', end: '2027-05-07' }

let browser: Browser
let gc: GcPractical
beforeAll(async () => {
  browser = await launchBrowser()
  gc = await makeGcPractical({ students: 2 })
  // A whole autumn term: X1 on Tuesdays, Y1 on Thursdays, the practical in X1's week 12.
  const db = testDb()
  await db.updateTable('sections').set({ weekday: 2, firstDate: '2026-09-01', lastDate: '2026-12-08', skippedDates: ['2026-11-24'] })
    .where('id', '=', gc.sectionId).execute()
  await db.updateTable('sections').set({ weekday: 4, firstDate: '2026-09-03', lastDate: '2026-12-10' })
    .where('courseId', '=', gc.courseId).where('id', '<>', gc.sectionId).execute()
  await db.updateTable('practicalSessions').set({ meetingDate: '2026-11-17', dueAt: new Date('2026-11-25T05:59:00Z') })
    .where('practicalId', '=', gc.practicalId).execute()
  await db.updateTable('courses').set({ term: 'Fall 2026', timezone: 'America/Chicago' }).where('id', '=', gc.courseId).execute()
  const student = await gc.signIn(gc.students[0]!)
  const upload = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 14 }).text)
  expect(upload.status).toBe(201)
})
afterAll(async () => {
  await testDb().deleteFrom('courses').where('createdBy', '=', gc.instructor.id).where('id', '<>', gc.courseId).execute()
  await gc?.cleanup()
  await browser?.close()
  await closeTestDb()
})

const countRows = async () => {
  const db = testDb()
  const n = (table: 'courses' | 'sections' | 'practicals' | 'practicalSessions' | 'auditLog') =>
    db.selectFrom(table).select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow().then((r) => Number(r.n))
  return { courses: await n('courses'), sections: await n('sections'), practicals: await n('practicals'),
    sessions: await n('practicalSessions'), audit: await n('auditLog') }
}

describe('copying a course to a new term', () => {
  it('previews without writing, then saves the new term with its dates and none of the old students', async () => {
    const owner = await gc.signIn(gc.instructor)
    const before = await countRows()
    const preview = await owner.post(`/api/courses/${gc.courseId}/copy/preview`, { ...spring, keepTas: false })
    expect(preview.status).toBe(200)
    expect(await countRows()).toEqual(before)
    expect(preview.body.sections.map((s) => [s.code, s.firstDate, s.lastDate])).toEqual([
      ['X1', '2027-01-12', '2027-04-20'], ['Y1', '2027-01-14', '2027-04-22'],
    ])
    expect(preview.body.practicals[0]!.sessions).toMatchObject([{ section: 'X1', oldMeetingDate: '2026-11-17', meetingDate: '2027-03-30' }])
    expect(preview.body.conflicts).toEqual([])
    expect(preview.body.notCopied.map((n) => n.noun)).toEqual(expect.arrayContaining(['enrolment', 'uploaded run', 'skipped date']))

    const ta = await gc.signIn(gc.ta)
    expect((await ta.post(`/api/courses/${gc.courseId}/copy`, spring)).status).toBe(403)
    const bad = await owner.post(`/api/courses/${gc.courseId}/copy`, { ...spring, end: '2027-01-01' })
    expect(bad.status).toBe(400)
    expect(bad.refusal.data?.field).toBe('end')
    // A term too short for Y1 (Thursdays) is refused, naming Y1's first date as people read it.
    const short = await owner.post(`/api/courses/${gc.courseId}/copy/preview`, { ...spring, end: '2027-01-13' })
    expect(short.status).toBe(400)
    expect(short.refusal.statusMessage).toBe('end: Section Y1 would not meet before the term ends (its first date is Thu 14 Jan 2027)')

    const saved = await owner.post(`/api/courses/${gc.courseId}/copy`, spring)
    expect(saved.status).toBe(201)
    const id = saved.body.id
    const copy = await owner.get(`/api/courses/${id}`)
    expect(copy.body).toMatchObject({ term: 'Spring 2027', timezone: 'America/Chicago', role: 'owner' })
    const sections = await owner.get(`/api/courses/${id}/sections`)
    const oldSections = await owner.get(`/api/courses/${gc.courseId}/sections`)
    for (const section of sections.body) {
      const old = oldSections.body.find((s) => s.code === section.code)!
      expect(section.weekday).toBe(old.weekday)
      expect(section.meetings.length).toBeGreaterThan(10)
      for (const m of section.meetings) expect(weekdayOf(m.date)).toBe(weekdayOf(old.meetings[0]!.date))
      expect(section.meetings.every((m) => m.date >= spring.start && m.date <= spring.end)).toBe(true)
      expect(section.enrolled).toBe(0)
      expect(section.tas).toEqual([])
      expect(section.skippedDates).toEqual([])
    }
    const db = testDb()
    const practicals = await db.selectFrom('practicals').select('id').where('courseId', '=', id).execute()
    expect(practicals).toHaveLength(1)
    const sessions = await db.selectFrom('practicalSessions').selectAll().where('practicalId', '=', practicals[0]!.id).execute()
    expect(sessions.map((s) => s.meetingDate)).toEqual(['2027-03-30'])
    expect(weekdayOf(sessions[0]!.meetingDate)).toBe(weekdayOf('2026-11-17'))
    expect(await db.selectFrom('enrollments').select('id').where('courseId', '=', id).execute()).toEqual([])
    expect(await db.selectFrom('submissions').select('id').where('practicalId', '=', practicals[0]!.id).execute()).toEqual([])
    const audit = await db.selectFrom('auditLog').select(['actorId', 'after']).where('action', '=', 'course.copy')
      .where('entityId', '=', String(id)).execute()
    expect(audit).toMatchObject([{ actorId: gc.instructor.id }])
    // A student of the old course does not see the new one.
    const student = await gc.signIn(gc.students[0]!)
    expect((await student.get(`/api/courses/${id}`)).status).toBe(404)
    expect((await owner.post(`/api/courses/${gc.courseId}/copy`, spring)).status).toBe(409)
  })

  for (const viewport of [{ width: 1440, height: 1000 }, { width: 820, height: 1180 }]) {
    it(`the copy page shows the preview and saves, at ${viewport.width} px`, async () => {
      const tab = await openTab(browser, viewport)
      const { page } = tab
      await signInThroughPage(page, gc.instructor.email, TEST_PASSWORD)
      await page.goto(`/courses/${gc.courseId}`)
      await page.getByRole('link', { name: 'Copy to a new term' }).click()
      await page.getByRole('heading', { name: /Copy TEST .* to a new term/, level: 1 }).waitFor()
      const term = `Autumn 2027 ${viewport.width}`
      await page.getByLabel(/^Term/).fill(term)
      await page.getByLabel(/^First day of term/).fill('2027-08-30')
      await page.getByLabel(/^Last day of term/).fill('2027-12-17')
      await page.getByRole('button', { name: 'Show the copy' }).click()
      await page.getByRole('heading', { name: '2 sections' }).waitFor()
      await page.getByText('Every date moves 52 weeks later').waitFor()
      await page.getByRole('heading', { name: 'Not copied' }).waitFor()
      await page.getByText('3 enrolments').waitFor()
      // The 820 px run copies into the same weeks as the 1440 px one, in the same room.
      if (viewport.width === 820) await page.getByText('2 scheduling conflicts in the new term').waitFor()
      // Dates people read are in the one style: none as an ISO code (inputs' values are not text).
      expect(await page.locator('main').innerText()).not.toMatch(/\b\d{4}-\d{2}-\d{2}\b|\d{4}-W\d{2}/)
      const violations = await seriousViolations(page)
      expect(violations, describeViolations(violations)).toEqual([])
      await screenshot(page, `course-copy-preview-${viewport.width}`)
      await expectNoSidewaysScroll(page)
      await page.getByRole('button', { name: new RegExp(`^Save TEST .* for ${term}$`) }).click()
      await page.waitForURL((url) => /\/courses\/\d+$/.test(url.pathname) && !url.pathname.endsWith(`/${gc.courseId}`))
      await page.getByText(`${term} · times in America/Chicago`).waitFor()
      await screenshot(page, `course-copy-saved-${viewport.width}`)
      expect(tab.problems).toEqual([])
      await tab.context.close()
    })
  }

  it('the new-course form starts with the browser\'s own time zone and asks to confirm it', async () => {
    const owner = await createUser('instructor', { name: 'Ines Brackwater' })
    const denver = await chromium.launch({
      executablePath: '/usr/bin/chromium', args: ['--disable-gpu', '--disable-quic'], env: { ...process.env, TZ: 'America/Denver' },
    })
    try {
      const tab = await openTab(denver, { width: 820, height: 1180 })
      const { page } = tab
      expect(await page.evaluate(() => Intl.DateTimeFormat().resolvedOptions().timeZone)).toBe('America/Denver')
      await signInThroughPage(page, owner.email, TEST_PASSWORD)
      await page.goto('/courses')
      await page.getByRole('button', { name: 'New course' }).click()
      const zone = page.getByLabel(/^Time zone of the lab/)
      expect(await zone.inputValue()).toBe('America/Denver')
      await page.getByText('Taken from this browser').waitFor()
      await page.getByLabel(/^Course code/).fill('CHEM 3120')
      await page.getByLabel(/^Term/).fill('Summer 2027')
      await page.getByLabel(/^Title/).fill('Halogenation Workshop')
      await page.getByRole('button', { name: 'Create course' }).click()
      await page.getByText('Confirm the time zone of the lab').waitFor()
      await screenshot(page, 'course-create-time-zone-820')
      const violations = await seriousViolations(page)
      expect(violations, describeViolations(violations)).toEqual([])
      await page.getByLabel(/^Meetings and due dates are on America\/Denver time/).check()
      await page.getByRole('button', { name: 'Create course' }).click()
      await page.waitForURL(/\/courses\/\d+/)
      await page.getByText('Summer 2027 · times in America/Denver').waitFor()
      const stored = await testDb().selectFrom('courses').select('timezone').where('createdBy', '=', owner.id).executeTakeFirstOrThrow()
      expect(stored.timezone).toBe('America/Denver')
      expect(tab.problems).toEqual([])
      await tab.context.close()
    } finally {
      await denver.close()
      await testDb().deleteFrom('courses').where('createdBy', '=', owner.id).execute()
    }
  })
})
