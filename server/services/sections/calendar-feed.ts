import { createHash, createHmac, randomBytes } from 'node:crypto'
import ical from 'ical-generator'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import type { Role } from '#shared/types/auth'
import { displayDateTime } from '#shared/utils/date-display'
import { audit, type Actor } from '../../utils/audit'
import { meetingsOf, sectionRows } from './section-rows'

// Personal iCalendar feeds of lab meetings. The feed URL carries a secret token (one per user)
// instead of a session, so calendar programs can subscribe; resetting it kills the old URL at
// once (410 Gone from then on).
//
// The database never holds the token: a feed is found by the token's SHA-256, and the owner can
// see the URL again because the token is an HMAC of a stored random seed under a key drawn from
// the server's secret (NUXT_SESSION_PASSWORD). A copy of the database alone cannot open feeds.

export const hashCalendarToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex')

let feedKey: { secret: string, key: Buffer } | undefined
/** The token of a seed under the server's secret (runtime config session.password). */
function calendarTokenOf(seed: Buffer, secret: string): string {
  if (feedKey?.secret !== secret) {
    feedKey = { secret, key: createHmac('sha256', secret).update('halocline calendar feed token').digest() }
  }
  return createHmac('sha256', feedKey.key).update(seed).digest('base64url')
}

export function calendarFeedUrl(token: string, appUrl: string): string {
  return `${appUrl.replace(/\/$/, '')}/calendar/${token}.ics`
}

/** A new seed for the user's feed (the old token, if any, is kept as revoked); returns the token. */
async function resetCalendarToken(trx: Transaction<Database>, userId: number, secret: string): Promise<string> {
  const seed = randomBytes(32)
  const token = calendarTokenOf(seed, secret)
  const old = await trx.selectFrom('calendarFeeds').select('tokenHash').where('userId', '=', userId).forUpdate().executeTakeFirst()
  if (old) {
    await trx.insertInto('calendarFeedRevocations').values({ tokenHash: old.tokenHash, userId }).onConflict((oc) => oc.doNothing())
      .execute()
  }
  await trx.insertInto('calendarFeeds').values({ userId, tokenHash: hashCalendarToken(token), tokenSeed: seed })
    .onConflict((oc) => oc.column('userId').doUpdateSet({ tokenHash: hashCalendarToken(token), tokenSeed: seed })).execute()
  return token
}

/** The token behind a stored feed, or null when it cannot be worked out (no seed, another secret). */
function storedCalendarToken(row: { tokenHash: string, tokenSeed: Buffer | null }, secret: string): string | null {
  if (!row.tokenSeed) return null
  const token = calendarTokenOf(row.tokenSeed, secret)
  return hashCalendarToken(token) === row.tokenHash ? token : null
}

/**
 * The caller's token, created on first use. A feed whose token cannot be shown again (stored
 * before seeds, or made under another server secret) gets a new one; the old URL then answers 410.
 */
export async function calendarToken(db: Kysely<Database>, userId: number, secret: string): Promise<string> {
  const stored = (on: Kysely<Database>) => on.selectFrom('calendarFeeds').select(['tokenHash', 'tokenSeed']).where('userId', '=', userId)
  const row = await stored(db).executeTakeFirst()
  const token = row && storedCalendarToken(row, secret)
  if (token) return token
  return db.transaction().execute(async (trx) => {
    // Two first calls at once: the second keeps the seed the first one wrote.
    const seed = randomBytes(32)
    await trx.insertInto('calendarFeeds').values({ userId, tokenHash: hashCalendarToken(calendarTokenOf(seed, secret)), tokenSeed: seed })
      .onConflict((oc) => oc.column('userId').doNothing()).execute()
    const again = await stored(trx).forUpdate().executeTakeFirstOrThrow()
    return storedCalendarToken(again, secret) ?? resetCalendarToken(trx, userId, secret)
  })
}

/** A new secret for the feed URL: calendars subscribed with the old one get 410 Gone from now on. */
export async function resetCalendarFeed(db: Kysely<Database>, actor: Actor, userId: number, secret: string): Promise<string> {
  return db.transaction().execute(async (trx) => {
    const fresh = await resetCalendarToken(trx, userId, secret)
    // The token itself stays out of the audit log: the log is not a place to keep secrets.
    await audit(trx, actor, { action: 'calendar.reset', entity: 'calendar_feed', entityId: userId })
    return fresh
  })
}

/** Whose feed a token opens; `revoked` when it opened one before a reset. */
export async function calendarOwner(db: Kysely<Database>, token: string) {
  const tokenHash = hashCalendarToken(token)
  const owner = await db.selectFrom('calendarFeeds').innerJoin('users', 'users.id', 'calendarFeeds.userId')
    .select(['users.id', 'users.name', 'users.role', 'users.disabledAt'])
    .where('calendarFeeds.tokenHash', '=', tokenHash).executeTakeFirst()
  if (owner) return { owner, revoked: false }
  const revoked = await db.selectFrom('calendarFeedRevocations').select('userId').where('tokenHash', '=', tokenHash).executeTakeFirst()
  return { owner: undefined, revoked: Boolean(revoked) }
}

/** The sections whose meetings belong in someone's calendar, by role; the scope is the where. */
function feedSections(db: Kysely<Database>, user: { id: number, role: Role }) {
  let query = sectionRows(db).select('courses.title as courseTitle')
  switch (user.role) {
    case 'student':
      query = query.where((eb) => eb.exists(eb.selectFrom('enrollments').select('enrollments.id')
        .whereRef('enrollments.sectionId', '=', 'sections.id').where('enrollments.userId', '=', user.id)
        .where('enrollments.status', '=', 'active')))
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

/** Every meeting of the user's sections, with the practical run at it, as iCalendar text. */
export async function calendarFeed(db: Kysely<Database>, user: { id: number, name: string, role: Role }, appUrl: string): Promise<string> {
  const sections = await feedSections(db, user)
  const sessions = sections.length
    ? await db.selectFrom('practicalSessions').innerJoin('practicals', 'practicals.id', 'practicalSessions.practicalId')
        .select(['practicals.id', 'practicals.title', 'practicalSessions.sectionId', 'practicalSessions.meetingDate',
          'practicalSessions.dueAt'])
        .where('practicalSessions.sectionId', 'in', sections.map((s) => s.id)).orderBy('practicals.id').execute()
    : []
  const byMeeting = new Map<string, typeof sessions>()
  for (const s of sessions) byMeeting.set(`${s.sectionId}|${s.meetingDate}`,
    [...(byMeeting.get(`${s.sectionId}|${s.meetingDate}`) ?? []), s])

  const base = appUrl.replace(/\/$/, '')
  const calendar = ical({ name: `Halocline lab meetings: ${user.name}`,
    prodId: { company: 'Halocline', product: 'lab-meetings', language: 'EN' } })
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
        ...practicals.map((p) => {
          const due = `${displayDateTime(p.dueAt, section.timezone)} (${section.timezone})`
          return `Practical: ${p.title}. Results due ${due}. ${base}/practicals/${p.id}`
        }),
      ].join('\n')
      calendar.createEvent({
        id: `meeting-${section.id}-${meeting.date}@halocline`,
        start: new Date(meeting.start),
        end: new Date(meeting.end),
        // A stable stamp (the section's last change) keeps the feed byte-identical between polls.
        stamp: section.updatedAt,
        summary: practicals.length ? `${label}: ${practicals.map((p) => p.title).join('; ')}` : `${label}: lab meeting`,
        location: section.room,
        description,
        url: practicals.length === 1 ? `${base}/practicals/${practicals[0]!.id}` : undefined,
      })
    }
  }
  return calendar.toString()
}
