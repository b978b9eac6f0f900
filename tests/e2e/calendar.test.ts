import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'

// iCalendar (RFC 5545): content lines folded at 75 octets continue with a leading space (§3.1).
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, '')
const lines = (text: string) => unfold(text).split('\r\n')
const events = (text: string) => unfold(text).split('BEGIN:VEVENT').slice(1).map((e) => e.split('END:VEVENT')[0]!)
const prop = (event: string, name: string) => event.split('\r\n').find((l) => l.startsWith(`${name}:`) || l.startsWith(`${name};`))?.replace(/^[^:]*:/, '')
const pathOf = (url: string) => new URL(url).pathname
// What a calendar program sends: no session, no HTML.
const CALENDAR_PROGRAM = { 'accept': 'text/calendar, */*', 'user-agent': 'CalendarAgent/1.0' }

let sections: Record<string, { id: number, firstDate: string, lastDate: string, weekday: number, skippedDates: string[] }>

/** Meeting dates worked out here, independently of the server's schedule code. */
function expectedDates(code: string) {
  const s = sections[code]!
  const dates: string[] = []
  for (let t = Date.parse(`${s.firstDate}T00:00:00Z`); t <= Date.parse(`${s.lastDate}T00:00:00Z`); t += 86_400_000) {
    const d = new Date(t)
    const date = d.toISOString().slice(0, 10)
    if ((d.getUTCDay() || 7) === s.weekday && !s.skippedDates.includes(date)) dates.push(date)
  }
  return dates
}

beforeAll(async () => {
  const rows = await testDb().selectFrom('sections').innerJoin('courses', 'courses.id', 'sections.courseId')
    .select(['sections.id', 'sections.code', 'sections.firstDate', 'sections.lastDate', 'sections.weekday', 'sections.skippedDates'])
    .where('courses.code', '=', 'CHEM 2240').execute()
  sections = Object.fromEntries(rows.map((r) => [r.code, r]))
})
afterAll(closeTestDb)

describe('calendar feed', () => {
  it('lists exactly a student’s own section meetings, skipped holiday left out, in UTC', async () => {
    // student49 is in R1, the Thursday section with a campus holiday (demo seed).
    const student = await signedIn(DEMO.student(49))
    const { status, body } = await student.get('/api/calendar')
    expect(status).toBe(200)
    expect(body.url).toMatch(/\/calendar\/[\w-]{43}\.ics$/)
    expect((await student.get('/api/calendar')).body.url).toBe(body.url)

    const feed = await new Client().get(pathOf(body.url))
    expect(feed.status).toBe(200)
    expect(feed.headers.get('content-type')).toBe('text/calendar; charset=utf-8')
    expect(feed.headers.get('cache-control')).toBe('private, max-age=300')
    const all = lines(feed.text)
    expect(all[0]).toBe('BEGIN:VCALENDAR')
    expect(all.filter(Boolean).at(-1)).toBe('END:VCALENDAR')
    expect(all).toContain('X-WR-TIMEZONE:America/Chicago')

    const r1 = sections.R1!
    const dates = expectedDates('R1')
    expect(r1.skippedDates).toHaveLength(1)
    expect(dates).not.toContain(r1.skippedDates[0])
    const vevents = events(feed.text)
    expect(vevents).toHaveLength(dates.length)
    expect(vevents.map((e) => prop(e, 'UID')).sort()).toEqual(dates.map((d) => `meeting-${r1.id}-${d}@halocline`).sort())
    for (const e of vevents) {
      expect(prop(e, 'DTSTART')).toMatch(/^\d{8}T\d{6}Z$/)
      expect(prop(e, 'LOCATION')).toBe('Bellweather Hall 216')
      const start = prop(e, 'DTSTART')!
      const instant = new Date(`${start.slice(0, 4)}-${start.slice(4, 6)}-${start.slice(6, 8)}T${start.slice(9, 11)}:${start.slice(11, 13)}:00Z`)
      // R1 meets Thursdays 08:30 Chicago time, whichever side of a DST change (IANA tz database).
      expect(new Intl.DateTimeFormat('en-GB', { timeZone: 'America/Chicago', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(instant)).toBe('08:30')
    }
    const withPractical = vevents.filter((e) => prop(e, 'SUMMARY')!.includes('Chlorination of 1-chlorobutane'))
    expect(withPractical).toHaveLength(1)
    expect(prop(withPractical[0]!, 'SUMMARY')).toContain('CHEM 2240 section R1')
    // TEXT values escape commas and new lines (RFC 5545 §3.3.11); the due time reads as on every page.
    const description = prop(withPractical[0]!, 'DESCRIPTION')!.replace(/\\n/gi, '\n').replace(/\\([,;\\])/g, '$1')
    expect(description).toMatch(/Results due (Mon|Tue|Wed|Thu|Fri|Sat|Sun) \d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2} \(America\/Chicago\)\./)
  })

  it('reset kills the old address at once (410 Gone, plain text) and the new one works', async () => {
    const student = await signedIn(DEMO.student(50))
    const old = (await student.get('/api/calendar')).body.url
    expect((await new Client().get(pathOf(old))).status).toBe(200)
    const reset = await student.post('/api/calendar/reset')
    expect(reset.status).toBe(200)
    expect(reset.body.url).not.toBe(old)
    const gone = await new Client().get(pathOf(old), { headers: CALENDAR_PROGRAM })
    expect(gone.status).toBe(410)
    expect(gone.headers.get('location')).toBeNull()
    expect(gone.headers.get('content-type')).toBe('text/plain; charset=utf-8')
    expect(gone.text).toMatch(/^This calendar address was replaced\./)
    expect((await new Client().get(pathOf(reset.body.url))).status).toBe(200)
    expect((await student.get('/api/calendar')).body.url).toBe(reset.body.url)
    // Some programs check an address with HEAD first: the same answers, no redirect.
    const head = (path: string) => new Client().request(path, { method: 'HEAD', headers: CALENDAR_PROGRAM })
    expect((await head(pathOf(reset.body.url))).status).toBe(200)
    const oldHead = await head(pathOf(old))
    expect([oldHead.status, oldHead.headers.get('location')]).toEqual([410, null])
    expect((await head(`/calendar/${'B'.repeat(43)}.ics`)).status).toBe(404)
  })

  it('answers a wrong token with a short plain 404, never a redirect to the sign-in page; the API wants a session', async () => {
    for (const headers of [CALENDAR_PROGRAM, { 'accept': 'text/html,application/xhtml+xml', 'user-agent': 'Mozilla/5.0' }, {}]) {
      for (const path of [`/calendar/${'A'.repeat(43)}.ics`, '/calendar/short.ics']) {
        const reply = await new Client().get(path, { headers })
        expect(reply.status, path).toBe(404)
        expect(reply.headers.get('location')).toBeNull()
        expect(reply.headers.get('content-type')).toBe('text/plain; charset=utf-8')
        expect(reply.text).toBe('No calendar at this address.\n')
      }
    }
    expect((await new Client().get('/api/calendar')).status).toBe(401)
    expect((await new Client().post('/api/calendar/reset')).status).toBe(401)
  })

  it('keeps only a hash of the token: the URL still shows again, and a database copy alone opens nothing', async () => {
    const student = await signedIn(DEMO.student(51))
    const url = (await student.get('/api/calendar')).body.url
    const token = /\/calendar\/([\w-]{43})\.ics$/.exec(url)![1]!
    const row = await testDb().selectFrom('calendarFeeds').innerJoin('users', 'users.id', 'calendarFeeds.userId')
      .selectAll('calendarFeeds').where('users.email', '=', DEMO.student(51)).executeTakeFirstOrThrow()
    expect(row.tokenHash).toBe(createHash('sha256').update(token).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(token)
    // The seed is not the token: fetching the feed by it finds nothing.
    expect((await new Client().get(`/calendar/${row.tokenSeed!.toString('base64url')}.ics`)).status).toBe(404)
    expect((await student.get('/api/calendar')).body.url).toBe(url)
  })

  it('a token stored before seeds keeps its subscription until its owner asks for the URL again', async () => {
    const student = await signedIn(DEMO.student(52))
    const { id } = await testDb().selectFrom('users').select('id').where('email', '=', DEMO.student(52)).executeTakeFirstOrThrow()
    const legacy = 'L'.repeat(43)
    await testDb().deleteFrom('calendarFeeds').where('userId', '=', id).execute()
    await testDb().insertInto('calendarFeeds').values({ userId: id, tokenHash: createHash('sha256').update(legacy).digest('hex'), tokenSeed: null }).execute()
    expect((await new Client().get(`/calendar/${legacy}.ics`)).status).toBe(200)
    const fresh = (await student.get('/api/calendar')).body.url
    expect(fresh).not.toContain(legacy)
    expect((await new Client().get(`/calendar/${legacy}.ics`)).status).toBe(410)
    expect((await new Client().get(pathOf(fresh))).status).toBe(200)
  })

  it('gives a TA their sections, and the coordinator every section', async () => {
    const ta = await signedIn(DEMO.ta1)
    const taFeed = await new Client().get(pathOf((await ta.get('/api/calendar')).body.url))
    const uids = events(taFeed.text).map((e) => prop(e, 'UID')!)
    const ids = new Set(uids.map((u) => Number(u.split('-')[1])))
    expect([...ids].sort()).toEqual([sections.M1!.id, sections.W1!.id].sort())
    expect(uids).toHaveLength(expectedDates('M1').length + expectedDates('W1').length)

    const coordinator = await signedIn(DEMO.coordinator)
    const feed = await new Client().get(pathOf((await coordinator.get('/api/calendar')).body.url))
    const total = ['M1', 'T1', 'W1', 'R1'].reduce((n, code) => n + expectedDates(code).length, 0)
    const demoEvents = events(feed.text).filter((e) => prop(e, 'SUMMARY')!.startsWith('CHEM 2240'))
    expect(demoEvents).toHaveLength(total)
  })
})
