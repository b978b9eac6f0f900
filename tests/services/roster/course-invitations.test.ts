import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { APP_URL, auditRows, instructorWithCourse, sectionOf, stubNitroGlobals } from '../arrange'
import { inviteTa, resendOpenInvitations } from '../../../server/services/roster/course-invitations'
import { hasJoined, invitationExpiry, invitationStateOf } from '../../../server/services/roster/invitations'
import { joinThroughCampus } from '../../../server/services/roster/invitation-commands'
import { zonedInstant } from '#shared/utils/dates'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

async function world() {
  const made = await instructorWithCourse()
  const section = await sectionOf(made.course.id, 'L01')
  return { ...made, section, ctx: { course: made.course, me: made.me, appUrl: APP_URL } }
}

describe('course invitations', () => {
  it('expire two weeks after the first meeting, in the course zone, or two weeks after now when later', async () => {
    const { course } = await world()
    // Sections from 2027-01-11 (arrange.ts); end of the 25th, Chicago time (CST, UTC-6: IANA tz database).
    const early = new Date('2026-12-01T12:00:00Z')
    expect((await invitationExpiry(testDb(), course, early)).toISOString()).toBe('2027-01-26T06:00:00.000Z')
    expect(zonedInstant('2027-01-26', '00:00', 'America/Chicago').toISOString()).toBe('2027-01-26T06:00:00.000Z')
    const late = new Date('2027-03-01T12:00:00Z')
    expect((await invitationExpiry(testDb(), course, late)).toISOString()).toBe('2027-03-15T12:00:00.000Z')
  })

  it('a TA invited by e-mail: an account without a password, on the sections, invited, audited', async () => {
    const { actor, ctx, course, section } = await world()
    const email = `ta-${course.id}@service.example`
    const result = await inviteTa(testDb(), actor, ctx, { email, name: 'Ines Carraway', sectionIds: [section.id] })
    expect(result.invited).toBe(true)
    const user = await testDb().selectFrom('users').select(['role', 'passwordHash']).where('id', '=', result.userId).executeTakeFirstOrThrow()
    expect(user).toEqual({ role: 'ta', passwordHash: null })
    expect(await testDb().selectFrom('sectionTas').select('sectionId').where('userId', '=', result.userId).execute())
      .toEqual([{ sectionId: section.id }])
    expect(await auditRows('course.invite-ta', course.id)).toHaveLength(1)
  })

  it('refuses a section of another course and a student e-mail, writing nothing', async () => {
    const { actor, ctx, course, section } = await world()
    const other = await world()
    const email = `ta2-${course.id}@service.example`
    await expect(inviteTa(testDb(), actor, ctx, { email, name: 'A', sectionIds: [section.id, other.section.id] }))
      .rejects.toMatchObject({ statusCode: 400 })
    const student = await createUser('student')
    await expect(inviteTa(testDb(), actor, ctx, { email: student.email, name: 'B', sectionIds: [section.id] }))
      .rejects.toMatchObject({ statusCode: 422 })
    expect(await testDb().selectFrom('users').select('id').where('email', '=', email).execute()).toEqual([])
    expect(await auditRows('course.invite-ta', course.id)).toHaveLength(0)
  })

  it('a resend round mails each person without a password once, whatever the number of calls with its key', async () => {
    const { actor, ctx, course, section } = await world()
    const { userId } = await inviteTa(testDb(), actor, ctx, { email: `ta3-${course.id}@service.example`, name: 'C', sectionIds: [section.id] })
    expect(await resendOpenInvitations(testDb(), actor, ctx, 'round-1')).toEqual({ sent: 1, alreadySent: 0 })
    expect(await resendOpenInvitations(testDb(), actor, ctx, 'round-1')).toEqual({ sent: 0, alreadySent: 1 })
    expect(await resendOpenInvitations(testDb(), actor, ctx, 'round-2')).toEqual({ sent: 1, alreadySent: 0 })
    const mails = await testDb().selectFrom('mailMessages').select('dedupeKey')
      .where('dedupeKey', 'like', `invitation-round:${course.id}:%:${userId}`).execute()
    expect(mails).toHaveLength(2)
    expect(await auditRows('invitation.resend-all', course.id)).toHaveLength(2)
  })

  it('someone who joined through the campus sign-in, with no password, is no longer invited, resent or re-invited', async () => {
    const { actor, ctx, course, section } = await world()
    const email = `ta4-${course.id}@service.example`
    const { userId } = await inviteTa(testDb(), actor, ctx, { email, name: 'D', sectionIds: [section.id] })
    await testDb().transaction().execute((trx) => joinThroughCampus(trx, { id: userId, ip: '127.0.0.1' }, userId))
    const after = await testDb().selectFrom('users').select(['passwordHash', 'campusJoinedAt']).where('id', '=', userId).executeTakeFirstOrThrow()
    expect(after.passwordHash).toBeNull()
    expect(after.campusJoinedAt).toBeInstanceOf(Date)
    const open = await testDb().selectFrom('invitations').select('id').where('userId', '=', userId).where('usedAt', 'is', null).execute()
    expect(open).toEqual([])
    expect(await resendOpenInvitations(testDb(), actor, ctx, 'round-campus')).toEqual({ sent: 0, alreadySent: 0 })
    // Put on another section: staffed, but not invited again.
    const other = await sectionOf(course.id, 'L02')
    expect((await inviteTa(testDb(), actor, ctx, { email, name: 'D', sectionIds: [other.id] })).invited).toBe(false)
    const roster = invitationStateOf({ joined: hasJoined(after), lastExpiresAt: new Date(Date.now() + 1000), lastUsedAt: new Date() })
    expect(roster.state).toBe('accepted')
  })
})
