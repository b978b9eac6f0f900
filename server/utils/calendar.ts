import { randomBytes } from 'node:crypto'
import ical from 'ical-generator'
import type { Transaction } from 'kysely'
import type { Database } from '../database/schema'
import type { Role } from '#shared/types/auth'

// Personal iCalendar feeds of lab meetings. The feed URL carries a secret token (one per user,
// 32 random bytes) instead of a session, so calendar programs can subscribe; resetting the token
// kills the old URL at once.

const newToken = () => randomBytes(32).toString('base64url')

export function calendarFeedUrl(token: string): string {
  return `${useRuntimeConfig().public.appUrl.replace(/\/$/, '')}/calendar/${token}.ics`
}

/** The caller's token, created on first use. */
export async function calendarToken(userId: number): Promise<string> {
  const db = useDb()
  await db.insertInto('calendarFeeds').values({ userId, token: newToken() }).onConflict((oc) => oc.column('userId').doNothing()).execute()
  const row = await db.selectFrom('calendarFeeds').select('token').where('userId', '=', userId).executeTakeFirstOrThrow()
  return row.token
}

export async function resetCalendarToken(trx: Transaction<Database>, userId: number): Promise<string> {
  const token = newToken()
  await trx.insertInto('calendarFeeds').values({ userId, token })
    .onConflict((oc) => oc.column('userId').doUpdateSet({ token })).execute()
  return token
}

export async function calendarOwner(token: string) {
  return useDb().selectFrom('calendarFeeds').innerJoin('users', 'users.id', 'calendarFeeds.userId')
    .select(['users.id', 'users.name', 'users.role', 'users.disabledAt'])
    .where('calendarFeeds.token', '=', token).executeTakeFirst()
}

/** The sections whose meetings belong in someone's calendar, by role; the scope is the where. */
function feedSections(user: { id: number, role: Role }) {
  let query = sectionRows().select('courses.title as courseTitle')
  switch (user.role) {
    case 'student':
      query = query.where((eb) => eb.exists(eb.selectFrom('enrollments').select('enrollments.id')
        .whereRef('enrollments.sectionId', '=', 'sections.id').where('enrollments.userId', '=', user.id).where('enrollments.status', '=', 'active')))
      break
    case 'ta':
      query = query.where((eb) => eb.exists(eb.selectFrom('sectionTas').select('sectionTas.userId')
        .whereRef('sectionTas.sectionId', '=', 'sections.id').where('sectionTas.userId', '=', user.id)))
      break
    case 'instructor':
      query = query.where((eb) => eb.exists(eb.selectFrom('courseOwners').select('courseOwners.userId')
        .whereRef('courseOwners.courseId', '=', 'sections.courseId').where('courseOwners.userId', '=', user.id)))
      break
    case 'coordinator':
      break
  }
  return query.execute()
}

const localTime = (iso: string, timezone: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone: timezone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(iso))
const localDateTime = (iso: string, timezone: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone: timezone, dateStyle: 'medium', timeStyle: 'short', hourCycle: 'h23' }).format(new Date(iso))

/** Every meeting of the user's sections, with the practical run at it, as iCalendar text. */
export async function calendarFeed(user: { id: number, name: string, role: Role }): Promise<string> {
  const sections = await feedSections(user)
  const sessions = sections.length
    ? await useDb().selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
      .select(['practicals.id', 'practicals.title', 'practicalSessions.sectionId', 'practicalSessions.meetingDate', 'practicalSessions.dueAt'])
      .where('practicalSessions.sectionId', 'in', sections.map((s) => s.id)).orderBy('practicals.id').execute()
    : []
  const byMeeting = new Map<string, typeof sessions>()
  for (const s of sessions) byMeeting.set(`${s.sectionId}|${s.meetingDate}`, [...(byMeeting.get(`${s.sectionId}|${s.meetingDate}`) ?? []), s])

  const appUrl = useRuntimeConfig().public.appUrl.replace(/\/$/, '')
  const calendar = ical({ name: `Halocline lab meetings: ${user.name}`, prodId: { company: 'Halocline', product: 'lab-meetings', language: 'EN' } })
  // Start and end are UTC instants; the course's zone is named for programs that show it.
  const zones = [...new Set(sections.map((s) => s.timezone))]
  if (zones.length === 1) calendar.x('X-WR-TIMEZONE', zones[0]!)

  for (const section of sections) {
    for (const meeting of meetingsOf(section)) {
      const practicals = byMeeting.get(`${section.id}|${meeting.date}`) ?? []
      const label = `${section.courseCode} section ${section.code}`
      const description = [
        `${section.courseCode} ${section.courseTitle}, section ${section.code}, ${section.room}.`,
        `${localTime(meeting.start, section.timezone)}–${localTime(meeting.end, section.timezone)} ${section.timezone} time.`,
        ...practicals.map((p) => `Practical: ${p.title}. Results due ${localDateTime(p.dueAt.toISOString(), section.timezone)} (${section.timezone}). ${appUrl}/practicals/${p.id}`),
      ].join('\n')
      calendar.createEvent({
        id: `meeting-${section.id}-${meeting.date}@halocline`,
        start: new Date(meeting.start),
        end: new Date(meeting.end),
        // A stable stamp (the section's last change) keeps the feed byte-identical between polls.
        // schema.ts types Generated<Timestamp> columns as the ColumnType itself; the value is a Date.
        stamp: section.updatedAt as unknown as Date,
        summary: practicals.length ? `${label}: ${practicals.map((p) => p.title).join('; ')}` : `${label}: lab meeting`,
        location: section.room,
        description,
        url: practicals.length === 1 ? `${appUrl}/practicals/${practicals[0]!.id}` : undefined,
      })
    }
  }
  return calendar.toString()
}
