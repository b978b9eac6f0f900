import { createHash } from 'node:crypto'
import { createError } from 'h3'
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import type { InvitationRoundResult, OpenInvitations, TaInvited } from '#shared/types/roster'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import { hasJoined } from './invitations'
import { inviteToCourse, withRosterRace, type RosterWriteContext } from './roster-import'

// A course's invitations as a whole: the people who have not set a password yet, a fresh link
// to all of them in one round, and TAs invited by e-mail the way students are.

type Db = Kysely<Database> | Transaction<Database>
type Person = { userId: number, email: string, name: string, role: 'student' | 'ta' }

/** Enrolled students and the sections' TAs who have not joined yet: no password, no campus sign-in (disabled accounts left out). */
async function peopleNotJoined(db: Db, courseId: number): Promise<Person[]> {
  const students = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['users.id as userId', 'users.email', 'users.name'])
    .where('enrollments.courseId', '=', courseId).where('enrollments.status', '=', 'active')
    .where('users.role', '=', 'student')
    .where('users.passwordHash', 'is', null).where('users.campusJoinedAt', 'is', null).where('users.disabledAt', 'is', null)
    .orderBy('users.id').execute()
  const tas = await db.selectFrom('users').select(['users.id as userId', 'users.email', 'users.name'])
    .where('users.role', '=', 'ta')
    .where('users.passwordHash', 'is', null).where('users.campusJoinedAt', 'is', null).where('users.disabledAt', 'is', null)
    .where('users.id', 'in', (eb) => eb.selectFrom('sectionTas').innerJoin('sections', 'sections.id', 'sectionTas.sectionId')
      .select('sectionTas.userId').where('sections.courseId', '=', courseId))
    .orderBy('users.id').execute()
  return [...students.map((s) => ({ ...s, role: 'student' as const })), ...tas.map((t) => ({ ...t, role: 'ta' as const }))]
}

export async function openInvitationsOf(db: Db, courseId: number): Promise<OpenInvitations> {
  const people = await peopleNotJoined(db, courseId)
  return { students: people.filter((p) => p.role === 'student').length, tas: people.filter((p) => p.role === 'ta').length }
}

/**
 * A fresh link to everyone of the course who has not set a password: one mail each, keyed
 * 'invitation-round:<course>:<round>:<user>'. The round is the request's key, so the same press
 * sent twice mails nobody twice and leaves the links of the first mails working (a person the
 * round already mailed is skipped before a new link would end the old one).
 */
export async function resendOpenInvitations(
  db: Kysely<Database>, actor: Actor, ctx: RosterWriteContext, roundKey: string,
): Promise<InvitationRoundResult> {
  const round = createHash('sha256').update(roundKey, 'utf8').digest('hex').slice(0, 24)
  return db.transaction().execute(async (trx) => {
    // One round at a time per course, so two copies of the same request cannot both pass the check below.
    await sql`select pg_advisory_xact_lock(hashtext(${`invitation-round:${ctx.course.id}`}))`.execute(trx)
    const people = await peopleNotJoined(trx, ctx.course.id)
    let sent = 0
    for (const person of people) {
      const key = `invitation-round:${ctx.course.id}:${round}:${person.userId}`
      const mailed = await trx.selectFrom('mailMessages').select('id').where('dedupeKey', '=', key).executeTakeFirst()
      if (mailed) continue
      await inviteToCourse(trx, ctx, person, { role: person.role, key })
      sent++
    }
    if (sent) {
      await audit(trx, actor, {
        action: 'invitation.resend-all', entity: 'course', entityId: ctx.course.id,
        after: { round, sent, people: people.map((p) => p.userId) },
      })
    }
    return { sent, alreadySent: people.length - sent }
  })
}

/**
 * A TA by e-mail: a new account (no password, invited) or an existing TA's, put on the chosen
 * sections of this course. An existing TA who has set a password gets no mail; they see the
 * sections at once. A student's or instructor's e-mail is refused.
 */
export async function inviteTa(
  db: Kysely<Database>, actor: Actor, ctx: RosterWriteContext, input: { email: string, name: string, sectionIds: number[] },
): Promise<TaInvited> {
  return withRosterRace(() => db.transaction().execute(async (trx) => {
    const sectionIds = [...new Set(input.sectionIds)]
    const sections = await trx.selectFrom('sections').select('id').where('courseId', '=', ctx.course.id)
      .where('id', 'in', sectionIds).execute()
    const stranger = sectionIds.find((id) => !sections.some((s) => s.id === id))
    if (stranger !== undefined) invalid([{ field: 'sectionIds', message: `Section ${stranger} is not part of this course` }])
    const user = await trx.selectFrom('users').select(['id', 'name', 'role', 'passwordHash', 'campusJoinedAt', 'disabledAt'])
      .where('email', '=', input.email).executeTakeFirst()
    if (user && user.role !== 'ta') {
      const kind = user.role === 'instructor' ? 'an instructor' : `a ${user.role}`
      invalid([{ field: 'email', message: `This e-mail belongs to ${kind} account, not a TA` }], 422)
    }
    if (user?.disabledAt) throw createError({ statusCode: 409, statusMessage: 'This account is disabled' })
    const userId = user?.id ?? (await trx.insertInto('users')
      .values({ email: input.email, name: input.name, role: 'ta', passwordHash: null })
      .returning('id').executeTakeFirstOrThrow()).id
    await trx.insertInto('sectionTas').values(sectionIds.map((sectionId) => ({ sectionId, userId })))
      .onConflict((oc) => oc.doNothing()).execute()
    const invited = !user || !hasJoined(user)
    if (invited) await inviteToCourse(trx, ctx, { userId, email: input.email, name: user?.name ?? input.name }, { role: 'ta' })
    await audit(trx, actor, {
      action: 'course.invite-ta', entity: 'course', entityId: ctx.course.id,
      after: { userId, sectionIds, newAccount: !user, invited },
    })
    return { userId, invited, sectionIds }
  }), 'This TA was just added by someone else. Reload the page.')
}
