import { afterAll, describe, expect, it } from 'vitest'
import type { ParsedMail } from 'mailparser'
import { Client, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { eventually, mailTo } from '../support/services'
import { makeCourse } from './fixtures/rosters/course'
import { zonedInstant } from '../../shared/utils/dates'

afterAll(closeTestDb)

const GOOD_PASSWORD = 'tidal mixing under a halocline'
const address = (who: string) => `${who}-${Math.random().toString(36).slice(2, 8)}@invite.example`
const tokenOf = (m: ParsedMail) => /\/invite\/([A-Za-z0-9_-]{43})/.exec(m.text ?? '')![1]!
const mailsTo = (email: string, n: number) => eventually(async () => {
  const got = await mailTo(email)
  return got.length >= n && got
})
const expiryOf = async (userId: number) => (await testDb().selectFrom('invitations').select('expiresAt')
  .where('userId', '=', userId).orderBy('id', 'desc').executeTakeFirstOrThrow()).expiresAt

describe('invitations that fit the term', () => {
  it('name the course and term and last until two weeks after the first meeting, or two weeks after sending when later', async () => {
    const made = await makeCourse()
    const email = address('term')
    const added = await made.client.post(`/api/sections/${made.sections.A1}/enrollments`, { email, name: 'Perpetua Lowden' })
    expect(added.status).toBe(201)
    const [message] = await mailsTo(email, 1)
    expect(message!.subject).toBe(`Your Halocline account for ${made.course.code}, Test term`)
    expect(message!.text).toContain(`${made.course.code} Roster Test Laboratory, Test term`)
    // First meeting 2027-01-11 (fixture), plus 14 days: valid through 25 January, course time (America/Chicago).
    expect((await expiryOf(added.body.userId)).toISOString()).toBe(zonedInstant('2027-01-26', '00:00', 'America/Chicago').toISOString())
    expect(message!.text).toContain('until Tue 26 Jan 2027, 00:00 (America/Chicago)')

    // A term that began long ago: two weeks from sending instead.
    const late = await makeCourse()
    await testDb().updateTable('sections').set({ firstDate: '2026-08-24' }).where('courseId', '=', late.course.id).execute()
    const before = Date.now()
    const lateAdd = await late.client.post(`/api/sections/${late.sections.A1}/enrollments`, { email: address('late'), name: 'Cosimo Ferrand' })
    expect(lateAdd.status).toBe(201)
    const days = ((await expiryOf(lateAdd.body.userId)).getTime() - before) / 86_400_000
    expect(days).toBeGreaterThanOrEqual(14)
    expect(days).toBeLessThan(14.01)
  })

  it('resend to everyone who has not accepted: one mail each, once per round, and the older links stop working', async () => {
    const made = await makeCourse()
    const people = [address('a'), address('b'), address('c')]
    const ids: number[] = []
    for (const [i, email] of people.entries()) {
      const r = await made.client.post(`/api/sections/${i ? made.sections.B1 : made.sections.A1}/enrollments`, { email, name: `Roster Person ${i}` })
      ids.push(r.body.userId)
    }
    const first = await Promise.all(people.map((p) => mailsTo(p, 1)))
    // The first person accepts; the other two do not.
    expect((await new Client().post('/api/invitations/accept', { token: tokenOf(first[0]![0]!), password: GOOD_PASSWORD })).status).toBe(200)
    expect((await made.client.get(`/api/courses/${made.course.id}/invitations`)).body).toEqual({ students: 2, tas: 0 })

    const headers = { 'idempotency-key': `round-${made.course.id}` }
    const round = await made.client.post(`/api/courses/${made.course.id}/invitations/resend`, undefined, { headers })
    expect(round.status).toBe(200)
    expect(round.body).toEqual({ sent: 2, alreadySent: 0 })
    // The same press again mails nobody, and does not end the links just sent.
    const again = await made.client.post(`/api/courses/${made.course.id}/invitations/resend`, undefined, { headers })
    expect(again.body).toEqual({ sent: 0, alreadySent: 2 })

    const keys = await testDb().selectFrom('mailMessages').select('dedupeKey').where('dedupeKey', 'like', `invitation-round:${made.course.id}:%`).execute()
    expect(keys.map((k) => k.dedupeKey.split(':').at(-1)).sort()).toEqual([String(ids[1]), String(ids[2])].sort())
    for (const [i, email] of people.slice(1).entries()) {
      const mails = await mailsTo(email, 2)
      expect(mails).toHaveLength(2)
      const fresh = mails.find((m) => tokenOf(m) !== tokenOf(first[i + 1]![0]!))!
      expect((await new Client().get(`/api/invitations/${tokenOf(first[i + 1]![0]!)}`)).status).toBe(410)
      expect((await new Client().get(`/api/invitations/${tokenOf(fresh)}`)).status).toBe(200)
    }
    expect(await mailTo(people[0]!)).toHaveLength(1)

    // Owners only.
    const ta = await createUser('ta')
    expect((await (await signedIn(ta.email, ta.password)).post(`/api/courses/${made.course.id}/invitations/resend`)).status).toBe(404)
  })
})

describe('a TA invited by e-mail', () => {
  it('gets an invitation for the course, accepts it and sees the sections they were put on', async () => {
    const made = await makeCourse()
    const email = address('ta')
    const invited = await made.client.post(`/api/courses/${made.course.id}/tas`, { email, name: 'Wendeline Achterberg', sectionIds: [made.sections.B1] })
    expect(invited.status).toBe(201)
    expect(invited.body).toMatchObject({ invited: true, sectionIds: [made.sections.B1] })
    const [message] = await mailsTo(email, 1)
    expect(message!.subject).toBe(`Your Halocline account for ${made.course.code}, Test term`)
    expect(message!.text).toContain('added you as a teaching assistant to')
    // Not accepted yet: counted with the course's open invitations.
    expect((await made.client.get(`/api/courses/${made.course.id}/invitations`)).body).toEqual({ students: 0, tas: 1 })

    const visitor = new Client()
    const accepted = await visitor.post('/api/invitations/accept', { token: tokenOf(message!), password: GOOD_PASSWORD })
    expect(accepted.status).toBe(200)
    expect(accepted.body.user.role).toBe('ta')
    const ta = await signedIn(email, GOOD_PASSWORD)
    const sections = await ta.get(`/api/courses/${made.course.id}/sections`)
    expect(sections.status).toBe(200)
    expect(sections.body.map((s) => s.code)).toEqual(['B1'])
    expect((await made.client.get(`/api/courses/${made.course.id}/invitations`)).body).toEqual({ students: 0, tas: 0 })

    // A student's e-mail is not made a TA; a section of another course is refused.
    const student = await createUser('student')
    const refused = await made.client.post(`/api/courses/${made.course.id}/tas`, { email: student.email, name: 'X', sectionIds: [made.sections.A1] })
    expect(refused.status).toBe(422)
    expect(refused.refusal.data?.field).toBe('email')
    const other = await makeCourse()
    const stranger = await made.client.post(`/api/courses/${made.course.id}/tas`, { email: address('x'), name: 'Y', sectionIds: [other.sections.A1] })
    expect(stranger.status).toBe(400)
  })
})
