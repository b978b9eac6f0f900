import { sql, type Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { escapeHtml } from '../../utils/html'
import { queueMail } from '../../utils/mail'
import { isoDateOf } from '#shared/utils/dates'
import { plural } from '../../../utils/words'

// The TAs' daily summary: the runs uploaded in their sections over the last day, new ones and
// resubmissions apart, one e-mail per TA per day (key 'ta-summary:<user>:<date>'), nothing for a
// TA with no new work or who opted out. A scheduled queue job runs it (server/workers/ta-summary.ts).

const DAY_MS = 86_400_000

export interface TaSummaryLine {
  courseId: number
  courseCode: string
  practicalId: number
  practicalTitle: string
  sectionCode: string
  fresh: number
  resubmitted: number
}

interface TaSummaryPerson { userId: number, name: string, email: string, lines: TaSummaryLine[] }

/** Runs stored in [since, until) in the sections each TA teaches, per practical and section. */
async function newWorkByTa(db: Kysely<Database>, since: Date, until: Date): Promise<TaSummaryPerson[]> {
  const rows = await db.selectFrom('submissions as s')
    .innerJoin('sectionTas as st', 'st.sectionId', 's.sectionId')
    .innerJoin('users as u', 'u.id', 'st.userId')
    .innerJoin('sections as sec', 'sec.id', 's.sectionId')
    .innerJoin('practicals as p', 'p.id', 's.practicalId')
    .innerJoin('courses as c', 'c.id', 'p.courseId')
    .select([
      'u.id as userId', 'u.name', 'u.email', 'c.id as courseId', 'c.code as courseCode', 'p.id as practicalId',
      'p.title as practicalTitle', 'sec.code as sectionCode',
      sql<number>`count(*) filter (where s.version = 1)::int`.as('fresh'),
      sql<number>`count(*) filter (where s.version > 1)::int`.as('resubmitted'),
    ])
    .where('s.createdAt', '>=', since).where('s.createdAt', '<', until)
    .where('u.role', '=', 'ta').where('u.disabledAt', 'is', null).where('u.passwordHash', 'is not', null).where('u.dailySummary', '=', true)
    .groupBy(['u.id', 'u.name', 'u.email', 'c.id', 'c.code', 'p.id', 'p.title', 'sec.code'])
    .orderBy('u.id').orderBy('c.code').orderBy('p.title').orderBy('sec.code')
    .execute()
  const people = new Map<number, TaSummaryPerson>()
  for (const r of rows) {
    const person = people.get(r.userId) ?? { userId: r.userId, name: r.name, email: r.email, lines: [] }
    person.lines.push({
      courseId: r.courseId, courseCode: r.courseCode, practicalId: r.practicalId, practicalTitle: r.practicalTitle,
      sectionCode: r.sectionCode, fresh: r.fresh, resubmitted: r.resubmitted,
    })
    people.set(r.userId, person)
  }
  return [...people.values()]
}

const lineText = (l: TaSummaryLine) => {
  const parts = [l.fresh ? plural(l.fresh, 'new run') : '', l.resubmitted ? plural(l.resubmitted, 'resubmission') : '']
  return `${l.courseCode} · ${l.practicalTitle}, section ${l.sectionCode}: ${parts.filter(Boolean).join(' and ')}`
}

/** Subject, text and HTML of one TA's summary; the links open each practical's review list. */
export function taSummaryMessage(person: TaSummaryPerson, appUrl: string) {
  const fresh = person.lines.reduce((n, l) => n + l.fresh, 0)
  const again = person.lines.reduce((n, l) => n + l.resubmitted, 0)
  const total = [fresh ? plural(fresh, 'new run') : '', again ? plural(again, 'resubmission') : ''].filter(Boolean).join(' and ')
  const base = appUrl.replace(/\/$/, '')
  const link = (l: TaSummaryLine) => `${base}/review/practicals/${l.practicalId}`
  const optOut = `You get this summary once a day when there is new work. Turn it off on your account page: ${base}/account`
  const text = [
    `Hello ${person.name},`, '', `In the last day your sections received ${total}:`, '',
    ...person.lines.map((l) => `- ${lineText(l)}\n  ${link(l)}`), '', optOut, '',
  ].join('\n')
  const html = [
    `<p>Hello ${escapeHtml(person.name)},</p>`, `<p>In the last day your sections received ${escapeHtml(total)}:</p>`,
    `<ul>${person.lines.map((l) => `<li><a href="${escapeHtml(link(l))}">${escapeHtml(lineText(l))}</a></li>`).join('')}</ul>`,
    `<p style="color:#3A5671">${escapeHtml(optOut)}</p>`,
  ].join('\n')
  return { subject: `Halocline: ${total} to review`, text, html }
}

/**
 * Queues the day's summaries: runs of the 24 hours before `now`, the key's date is `now`'s (UTC),
 * so a second run the same day mails nobody again. Returns how many were queued by this call.
 */
export async function queueTaSummaries(db: Kysely<Database>, now: Date, appUrl: string): Promise<{ queued: number, date: string }> {
  const date = isoDateOf(now, 'UTC')
  const people = await newWorkByTa(db, new Date(now.getTime() - DAY_MS), now)
  let queued = 0
  for (const person of people) {
    const message = taSummaryMessage(person, appUrl)
    // The message row and its delivery job together, per TA.
    const { created } = await db.transaction().execute((trx) => queueMail(trx, {
      key: `ta-summary:${person.userId}:${date}`, kind: 'ta-summary', to: [person.email], ...message,
      createdBy: null, courseId: person.lines.length === 1 ? person.lines[0]!.courseId : null,
    }))
    if (created) queued++
  }
  return { queued, date }
}
