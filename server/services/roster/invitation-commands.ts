import { createError } from 'h3'
import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { audit, type Actor, type AuditActor } from '../../utils/audit'
import { findInvitation, hasJoined, invitationGone } from './invitations'
import { inviteToCourse } from './roster-import'

// Invitation links after the first: sent again by an instructor, spent by the student.

type Db = Kysely<Database>

/**
 * A fresh link for a student who has not set a password; their older links stop working. Only
 * an instructor who owns a course the student is (or was) enrolled in may send it: 404 otherwise.
 */
export async function resendInvitation(db: Db, actor: Actor, me: { id: number, name: string }, studentId: number, appUrl: string) {
  const found = await db.selectFrom('enrollments')
    .innerJoin('courseOwners', 'courseOwners.courseId', 'enrollments.courseId')
    .innerJoin('courses', 'courses.id', 'enrollments.courseId')
    .innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['users.id', 'users.email', 'users.name', 'users.passwordHash', 'users.campusJoinedAt', 'users.disabledAt',
      'courses.id as courseId', 'courses.code', 'courses.title', 'courses.term', 'courses.timezone'])
    .where('enrollments.userId', '=', studentId).where('courseOwners.userId', '=', me.id).where('users.role', '=', 'student')
    .orderBy((eb) => eb.case().when('enrollments.status', '=', 'active').then(0).else(1).end())
    .orderBy('enrollments.createdAt', 'desc').executeTakeFirst()
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Student not found' })
  if (hasJoined(found)) throw createError({ statusCode: 409, statusMessage: 'This student has already joined' })
  if (found.disabledAt) throw createError({ statusCode: 409, statusMessage: 'This account is disabled' })

  const invitation = await db.transaction().execute(async (trx) => {
    const course = { id: found.courseId, code: found.code, title: found.title, term: found.term, timezone: found.timezone }
    const issued = await inviteToCourse(trx, { course, me, appUrl }, { userId: found.id, email: found.email, name: found.name })
    await audit(trx, actor, {
      action: 'invitation.resend', entity: 'user', entityId: found.id,
      after: { invitationId: issued.id, expiresAt: issued.expiresAt.toISOString() },
    })
    return issued
  })
  return { userId: found.id, expiresAt: invitation.expiresAt.toISOString() }
}

/**
 * Spends an open invitation and sets the password (already hashed). A second use, even at the
 * same moment, gets 410; the person's other open links die with it. Returns the account.
 */
export async function acceptInvitation(db: Db, actor: AuditActor, token: string, invitation: { invitationId: number, userId: number },
  passwordHash: string) {
  return db.transaction().execute(async (trx) => {
    const now = new Date()
    const spent = await trx.updateTable('invitations').set({ usedAt: now })
      .where('id', '=', invitation.invitationId).where('usedAt', 'is', null).where('expiresAt', '>', now)
      .returning('userId').executeTakeFirst()
    if (!spent) invitationGone((await findInvitation(trx, token)).status as 'used' | 'expired')
    await trx.updateTable('invitations').set({ expiresAt: now })
      .where('userId', '=', invitation.userId).where('usedAt', 'is', null).where('expiresAt', '>', now).execute()
    const row = await trx.updateTable('users').set({ passwordHash, updatedAt: now }).where('id', '=', invitation.userId)
      .returning(['id', 'email', 'name', 'role', 'sessionVersion']).executeTakeFirstOrThrow()
    await audit(trx, actor,
      { action: 'invitation.accept', entity: 'user', entityId: row.id, after: { invitationId: invitation.invitationId } })
    return row
  })
}

/**
 * A campus sign-in of a linked account, in the sign-in's transaction: the person has joined
 * (first time only), and their open invitations are spent, since the campus sign-in is how
 * they accepted. One audit row when it spent any.
 */
export async function joinThroughCampus(db: Db, actor: AuditActor, userId: number) {
  const now = new Date()
  await db.updateTable('users').set({ campusJoinedAt: now }).where('id', '=', userId).where('campusJoinedAt', 'is', null).execute()
  const spent = await db.updateTable('invitations').set({ usedAt: now })
    .where('userId', '=', userId).where('usedAt', 'is', null).where('expiresAt', '>', now)
    .returning('id').execute()
  if (spent.length) {
    await audit(db, actor, {
      action: 'invitation.accept', entity: 'user', entityId: userId, after: { invitationIds: spent.map((i) => i.id), through: 'campus' },
    })
  }
}
