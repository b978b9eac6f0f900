import { createHash } from 'node:crypto'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { eventually, mailTo } from '../support/services'
import { makeCourse } from './fixtures/rosters/course'
import { zonedInstant } from '../../shared/utils/dates'

afterAll(closeTestDb)

const GOOD_PASSWORD = 'tidal mixing under a halocline'

/** Adds a new person to a fresh course and waits for their invitation e-mail to arrive. */
async function invited(name = 'Ottilie Marchbank') {
  const made = await makeCourse()
  const email = `invitee-${Math.random().toString(36).slice(2, 8)}@invite.example`
  const added = await made.client.post(`/api/sections/${made.sections.A1}/enrollments`, { email, name })
  expect(added.status).toBe(201)
  const [message] = await eventually(async () => {
    const received = await mailTo(email)
    return received.length > 0 && received
  })
  const link = /https?:\/\/\S+\/invite\/([A-Za-z0-9_-]{43})/.exec(message!.text ?? '')
  expect(link, 'the e-mail carries an invitation link').not.toBeNull()
  return { ...made, email, userId: added.body.userId as number, message: message!, link: link![0], token: link![1]! }
}

describe('invitations', () => {
  it('the e-mail arrives with a link that sets a password once, signs the person in, and then fails with 410', async () => {
    const { message, link, token, email, userId, client: instructor, sections } = await invited('Zoë <Quill> & Co')
    expect(message.subject).toMatch(/^Your Halocline account for TEST /)
    expect(link.startsWith(`${inject('baseUrl')}/invite/`)).toBe(true)
    // The name is escaped in the HTML part and plain in the text part.
    expect(message.html).toContain('Zoë &lt;Quill&gt; &amp; Co')
    expect(message.html).not.toContain('<Quill>')
    expect(message.text).toContain('Hello Zoë <Quill> & Co,')

    // Only the SHA-256 of the token is stored.
    const stored = await testDb().selectFrom('invitations').select(['tokenHash', 'expiresAt', 'createdAt']).where('userId', '=', userId).execute()
    expect(stored).toHaveLength(1)
    expect(stored[0]!.tokenHash).toBe(createHash('sha256').update(token).digest('hex'))
    expect(stored[0]!.tokenHash).not.toContain(token)
    // The fixture's first meeting is 2027-01-11: the link lasts to the end of 25 January, course time.
    expect(stored[0]!.expiresAt.toISOString()).toBe(zonedInstant('2027-01-26', '00:00', 'America/Chicago').toISOString())

    const visitor = new Client()
    const shown = await visitor.get(`/api/invitations/${token}`)
    expect(shown.status).toBe(200)
    // Password sign-in is on here, so the page asks for a password (campus-refusals.test.ts: off).
    expect(shown.body).toEqual({
      name: 'Zoë <Quill> & Co', email, expiresAt: stored[0]!.expiresAt.toISOString(),
      signIn: 'password', campusLabel: 'Sign in with your campus account',
    })

    expect((await visitor.post('/api/invitations/accept', { token, password: 'short' })).status).toBe(400)
    const common = await visitor.post('/api/invitations/accept', { token, password: 'password1234' })
    expect(common.status).toBe(422)
    expect(common.refusal.data?.field).toBe('password')

    const accepted = await visitor.post('/api/invitations/accept', { token, password: GOOD_PASSWORD })
    expect(accepted.status).toBe(200)
    expect(accepted.body.user).toEqual({ id: userId, email, name: 'Zoë <Quill> & Co', role: 'student' })
    expect((await visitor.get('/api/overview/student')).status).toBe(200)

    const again = await new Client().post('/api/invitations/accept', { token, password: 'another long password 2' })
    expect(again.status).toBe(410)
    expect((await new Client().get(`/api/invitations/${token}`)).status).toBe(410)

    // The new password signs in; the roster shows the account as set up.
    const signed = await signedIn(email, GOOD_PASSWORD)
    expect((await signed.get('/api/overview/student')).status).toBe(200)
    const roster = await instructor.get(`/api/sections/${sections.A1}/roster`)
    expect(roster.body.students[0]!.invitation).toEqual({ state: 'accepted', expiresAt: null })
  })

  it('an expired link fails with 410 and sets no password', async () => {
    const { token, userId, client, sections } = await invited()
    await testDb().updateTable('invitations').set({ expiresAt: new Date(Date.now() - 60_000) }).where('userId', '=', userId).execute()
    const shown = await new Client().get(`/api/invitations/${token}`)
    expect(shown.status).toBe(410)
    expect(shown.refusal.data?.reason).toBe('expired')
    expect((await new Client().post('/api/invitations/accept', { token, password: GOOD_PASSWORD })).status).toBe(410)
    const user = await testDb().selectFrom('users').select('passwordHash').where('id', '=', userId).executeTakeFirstOrThrow()
    expect(user.passwordHash).toBeNull()
    const roster = await client.get(`/api/sections/${sections.A1}/roster`)
    expect(roster.body.students[0]!.invitation.state).toBe('expired')
  })

  it('a resend makes a fresh link and retires the old one; only the owning instructor may send it', async () => {
    const { token: oldToken, userId, email, client } = await invited()
    const resent = await client.post(`/api/users/${userId}/invitation`)
    expect(resent.status).toBe(201)
    const mails = await eventually(async () => {
      const received = await mailTo(email)
      return received.length >= 2 && received
    })
    const newToken = /\/invite\/([A-Za-z0-9_-]{43})/.exec(mails.map((m) => m.text ?? '').find((t) => !t.includes(oldToken))!)![1]!
    expect(newToken).not.toBe(oldToken)
    expect((await new Client().get(`/api/invitations/${oldToken}`)).status).toBe(410)
    expect((await new Client().get(`/api/invitations/${newToken}`)).status).toBe(200)

    const stranger = await createUser('instructor')
    expect((await (await signedIn(stranger.email, stranger.password)).post(`/api/users/${userId}/invitation`)).status).toBe(404)
    expect((await (await signedIn(DEMO.ta1)).post(`/api/users/${userId}/invitation`)).status).toBe(403)
    expect((await new Client().post(`/api/users/${userId}/invitation`)).status).toBe(401)

    expect((await new Client().post('/api/invitations/accept', { token: newToken, password: GOOD_PASSWORD })).status).toBe(200)
    const done = await client.post(`/api/users/${userId}/invitation`)
    expect(done.status).toBe(409)
  })

  it('an unknown or malformed link is 404, and the accept route validates its body', async () => {
    const visitor = new Client()
    expect((await visitor.get(`/api/invitations/${'A'.repeat(43)}`)).status).toBe(404)
    expect((await visitor.get('/api/invitations/not-a-token')).status).toBe(404)
    expect((await visitor.post('/api/invitations/accept', { token: 'A'.repeat(43), password: GOOD_PASSWORD })).status).toBe(404)
    const bad = await visitor.post('/api/invitations/accept', { token: 'x', password: GOOD_PASSWORD })
    expect(bad.status).toBe(400)
    expect(bad.refusal.data?.field).toBe('token')
  })
})
