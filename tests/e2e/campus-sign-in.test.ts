import { afterAll, describe, expect, inject, it } from 'vitest'
import { Client, DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { callBack, campusCallbackUrl, campusSignIn } from '../support/campus'

// The shared test server's campus sign-in points at the local identity provider
// (scripts/identity-provider.mjs, oidc-provider) that scripts/lib/world.mjs starts with it.

afterAll(closeTestDb)

const userByEmail = (email: string) => testDb().selectFrom('users').select(['id', 'role']).where('email', '=', email).executeTakeFirstOrThrow()

async function auditSince(id: number) {
  return testDb().selectFrom('auditLog').select(['action', 'actorId', 'entityId', 'after'])
    .where('id', '>', id).where('action', 'like', 'sign-in.%').orderBy('id').execute()
}
const lastAuditId = async () =>
  (await testDb().selectFrom('auditLog').select((eb) => eb.fn.max('id').as('id')).executeTakeFirstOrThrow()).id ?? 0

async function sessionUser(client: Client) {
  const reply = await client.get('/api/_auth/session')
  return (reply.body as { user?: { id: number, role: string } }).user
}

describe('campus sign-in through the local provider', () => {
  it('says which sign-in methods the installation offers', async () => {
    const options = await new Client().get('/api/auth/options')
    expect(options.status).toBe(200)
    expect(options.body).toEqual({ campus: { label: 'Sign in with your campus account' }, password: 'everyone', helpContact: 'your course instructor' })
  })

  it('signs a student in to their own account by the registrar id and keeps the page asked for', async () => {
    const before = await lastAuditId()
    const { client, landed } = await campusSignIn(DEMO.student(1), { next: '/results' })
    expect(landed).toBe('/results')
    const student = await userByEmail(DEMO.student(1))
    expect(await sessionUser(client)).toMatchObject({ id: student.id, role: 'student' })
    expect((await client.get('/api/me/lab')).status).toBe(200)
    expect(await auditSince(before)).toEqual([
      { action: 'sign-in.campus', actorId: student.id, entityId: String(student.id), after: { linkedBy: 'id claim' } },
    ])
  })

  it('signs a TA in by the verified e-mail (staff ids are on no roster); the role is the course\'s, not the provider\'s', async () => {
    const before = await lastAuditId()
    const { client, landed } = await campusSignIn(DEMO.ta1)
    expect(landed).toBe('/')
    const ta = await userByEmail(DEMO.ta1)
    expect(await sessionUser(client)).toMatchObject({ id: ta.id, role: 'ta' })
    expect((await client.get('/api/review/practicals')).status).toBe(200)
    expect((await auditSince(before)).map((a) => a.after)).toEqual([{ linkedBy: 'verified e-mail' }])
  })

  it('links by the id claim when the account\'s e-mail is not the campus one', async () => {
    const student = await userByEmail(DEMO.student(7))
    await testDb().updateTable('users').set({ email: 'someone-else-07@test.example' }).where('id', '=', student.id).execute()
    try {
      const { client } = await campusSignIn('LS2640359') // student 07's demo registrar id: 2640100 + 7 × 37
      expect(await sessionUser(client)).toMatchObject({ id: student.id })
    } finally {
      await testDb().updateTable('users').set({ email: DEMO.student(7) }).where('id', '=', student.id).execute()
    }
  })

  it('turns away a person with a campus account but no place in any course, and makes no account', async () => {
    const countUsers = async () => Number((await testDb().selectFrom('users').select((eb) => eb.fn.countAll().as('n')).executeTakeFirstOrThrow()).n)
    const usersBefore = await countUsers()
    const before = await lastAuditId()
    const { client, landed } = await campusSignIn('visitor@larkspur.example')
    expect(landed).toBe('/sign-in-problem?reason=unknown-person')
    expect(await sessionUser(client)).toBeUndefined()
    expect(await countUsers()).toBe(usersBefore)
    const rows = await auditSince(before)
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ action: 'sign-in.campus-refused', actorId: null, after: { reason: 'unknown-person' } })
    const page = await client.get('/sign-in-problem?reason=unknown-person')
    expect(page.text).toContain('Halocline does not know you yet')
    expect(page.text).toContain('Ask your course instructor')
  })
})

describe('signing out at the provider too', () => {
  it('sends the browser to the provider\'s own sign-out, which asks, signs out there and comes back to our sign-in page', async () => {
    const { client } = await campusSignIn(DEMO.student(8))
    expect((await client.post('/api/auth/logout', {})).status).toBe(204)
    const reply = await client.get('/auth/campus/sign-out')
    expect(reply.status).toBe(302)
    const to = new URL(reply.headers.get('location')!)
    expect(to.origin + to.pathname).toBe(`${inject('idpUrl')}/session/end`)
    expect(to.searchParams.get('post_logout_redirect_uri')).toBe(`${inject('baseUrl')}/login`)
    const page = await client.get(to.href)
    expect(page.status).toBe(200)
    expect(page.text).toContain('Sign out of your campus account?')
    const action = /<form[^>]*action="([^"]+)"/.exec(page.text)![1]!
    const xsrf = /name="xsrf" value="([^"]+)"/.exec(page.text)![1]!
    const confirmed = await client.request(new URL(action, to).href, { method: 'POST', body: new URLSearchParams({ xsrf, logout: 'yes' }) })
    expect(confirmed.status).toBe(303)
    expect(confirmed.headers.get('location')).toBe(`${inject('baseUrl')}/login`)
    // Signed out there too: a new campus sign-in asks for the password again.
    const start = await client.get('/auth/campus/start')
    const atProvider = await client.get(start.headers.get('location')!)
    const form = await client.get(new URL(atProvider.headers.get('location')!, inject('idpUrl')).href)
    expect(form.text).toContain('E-mail or campus id')
  })
})

describe('campus callbacks that are refused', () => {
  it('refuses a replayed callback (the same state twice), with an audit row', async () => {
    const client = new Client()
    const url = await campusCallbackUrl(client, DEMO.student(2))
    expect(await callBack(client, url)).toBe('/')
    const before = await lastAuditId()
    const again = new Client()
    again.cookies = new Map(client.cookies)
    expect(await callBack(again, url)).toBe('/sign-in-problem?reason=replayed-state')
    expect((await auditSince(before)).map((a) => a.after)).toEqual([{ reason: 'replayed-state' }])
  })

  it('refuses a state it never issued, and a callback finished in another browser', async () => {
    const before = await lastAuditId()
    expect(await callBack(new Client(), '/auth/campus/callback?code=abc&state=not-one-of-ours')).toBe('/sign-in-problem?reason=wrong-state')
    const started = new Client()
    const url = await campusCallbackUrl(started, DEMO.student(3))
    const elsewhere = new Client()
    expect(await callBack(elsewhere, url)).toBe('/sign-in-problem?reason=wrong-state')
    expect(await sessionUser(elsewhere)).toBeUndefined()
    expect((await auditSince(before)).map((a) => a.after)).toEqual([{ reason: 'wrong-state' }, { reason: 'wrong-state' }])
  })

  it('refuses a code the provider already redeemed, sent with a fresh state', async () => {
    const client = new Client()
    const first = await campusCallbackUrl(client, DEMO.student(4))
    expect(await callBack(client, first)).toBe('/')
    const fresh = new URL(await campusCallbackUrl(client, DEMO.student(4)))
    fresh.searchParams.set('code', new URL(first).searchParams.get('code')!)
    const before = await lastAuditId()
    expect(await callBack(client, fresh.href)).toBe('/sign-in-problem?reason=code-rejected')
    expect((await auditSince(before)).map((a) => (a.after as { reason: string }).reason)).toEqual(['code-rejected'])
  })

  it('counts each callback in the sign-in throttle, succeeded or not', async () => {
    const { id: before } = await testDb().selectFrom('loginAttempts').select((eb) => eb.fn.coalesce(eb.fn.max('id'), eb.lit(0)).as('id'))
      .executeTakeFirstOrThrow()
    await campusSignIn(DEMO.student(5))
    await callBack(new Client(), '/auth/campus/callback?code=x&state=y')
    const rows = await testDb().selectFrom('loginAttempts').select(['email', 'succeeded']).where('id', '>', before).orderBy('id').execute()
    expect(rows.map((r) => [r.email.startsWith('campus:'), r.succeeded])).toEqual([[true, true], [true, false]])
  })
})

describe('password sign-in beside it', () => {
  it('still signs in with a password and leaves the same kind of audit row', async () => {
    const before = await lastAuditId()
    const client = new Client()
    expect((await client.post('/api/auth/login', { email: DEMO.student(6), password: 'halocline-demo' })).status).toBe(200)
    const student = await userByEmail(DEMO.student(6))
    expect(await auditSince(before)).toEqual([{ action: 'sign-in.password', actorId: student.id, entityId: String(student.id), after: null }])
  })
})
