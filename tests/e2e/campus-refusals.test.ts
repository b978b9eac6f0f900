import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { Client, DEMO } from '../support/http'
import { createFaultWorld, type FaultWorld, type ServerProcess } from '../support/fault-world'
import { startTestIssuer, type TestIssuer } from '../support/test-issuer'
import { hashInvitationToken } from '../../server/services/roster/invitations'

// A server of its own (its own seeded database) whose campus provider is the misbehaving test
// issuer, so each refusal can be made on purpose. Every refusal must end on the explanation page
// with no session and exactly one audit row naming the reason.

const LEEWAY = 60
let issuer: TestIssuer
let world: FaultWorld
let server: ServerProcess

beforeAll(async () => {
  issuer = await startTestIssuer()
  world = await createFaultWorld('campus', {
    NUXT_CAMPUS_ISSUER: issuer.url,
    NUXT_CAMPUS_CLIENT_ID: issuer.clientId,
    NUXT_CAMPUS_CLIENT_SECRET: 'test-secret',
    NUXT_CAMPUS_TIMEOUT_SECONDS: '2',
    NUXT_CAMPUS_CLOCK_LEEWAY_SECONDS: String(LEEWAY),
  })
  server = await world.startServer()
}, 120_000)

afterAll(async () => {
  await world?.close()
  await issuer?.close()
})

beforeEach(() => {
  issuer.behaviour = { claims: {} }
})

const now = () => Math.floor(Date.now() / 1000)

/** Starts a sign-in, lets the "provider" answer with `code`, and returns where Halocline sends the browser. */
async function signInThroughIssuer(client = new Client(server.baseUrl), code = 'code-1') {
  const start = await client.get('/auth/campus/start')
  expect(start.status).toBe(302)
  const authorize = new URL(start.headers.get('location')!)
  expect(authorize.origin).toBe(issuer.url)
  expect(authorize.searchParams.get('code_challenge_method')).toBe('S256')
  issuer.nonce = authorize.searchParams.get('nonce')!
  const state = authorize.searchParams.get('state')!
  const back = await client.get(`/auth/campus/callback?code=${code}&state=${encodeURIComponent(state)}`)
  expect(back.status).toBe(302)
  return { client, landed: back.headers.get('location') }
}

async function lastAuditId() {
  const row = await world.db.selectFrom('auditLog').select((eb) => eb.fn.max('id').as('id')).executeTakeFirstOrThrow()
  return row.id ?? 0
}
async function campusAuditSince(id: number) {
  const rows = await world.db.selectFrom('auditLog').select(['action', 'after']).where('id', '>', id)
    .where('action', 'like', 'sign-in.campus%').orderBy('id').execute()
  return rows.map((r) => ({ action: r.action, reason: (r.after as { reason?: string, linkedBy?: string }).reason ?? null }))
}
async function signedInUser(client: Client) {
  return ((await client.get('/api/_auth/session')).body as { user?: { id: number, role: string } }).user
}

async function expectRefused(reason: string, prepare: () => void) {
  prepare()
  const before = await lastAuditId()
  const { client, landed } = await signInThroughIssuer()
  expect(landed).toBe(`/sign-in-problem?reason=${reason}`)
  expect(await signedInUser(client)).toBeUndefined()
  expect(await campusAuditSince(before)).toEqual([{ action: 'sign-in.campus-refused', reason }])
  const page = await client.get(landed!)
  expect(page.status).toBe(200)
  expect(page.text).toContain('Back to sign-in')
}

describe('the test issuer itself', () => {
  it('signs student01 in when nothing is bent, and a token issued within the leeway ahead is accepted', async () => {
    const student = await world.db.selectFrom('users').select('id').where('email', '=', DEMO.student(1)).executeTakeFirstOrThrow()
    issuer.behaviour.claims = { iat: now() + LEEWAY / 2 }
    const { client, landed } = await signInThroughIssuer()
    expect(landed).toBe('/')
    expect(await signedInUser(client)).toMatchObject({ id: student.id, role: 'student' })
  })
})

describe('refusals, each with a page and an audit row', () => {
  it('a wrong nonce', () => expectRefused('wrong-nonce', () => { issuer.behaviour.claims = { nonce: 'somebody-elses-nonce' } }))
  it('a token for another audience', () => expectRefused('wrong-audience', () => { issuer.behaviour.claims = { aud: 'another-app' } }))
  it('a token from another issuer', () => expectRefused('wrong-issuer', () => { issuer.behaviour.claims = { iss: 'http://127.0.0.1:9/elsewhere' } }))
  it('a token already expired by our clock (the provider\'s clock behind)', () =>
    expectRefused('clock-skew', () => { issuer.behaviour.claims = { iat: now() - 1000, exp: now() - 10 * LEEWAY } }))
  it('a token issued in the future beyond the leeway (the provider\'s clock ahead)', () =>
    expectRefused('clock-skew', () => { issuer.behaviour.claims = { iat: now() + 10 * LEEWAY, exp: now() + 20 * LEEWAY } }))
  it('a token without the id claim', () => expectRefused('missing-id-claim', () => { issuer.behaviour.claims = { campus_id: undefined } }))
  it('an expired code (the provider answers invalid_grant)', () =>
    expectRefused('code-rejected', () => { issuer.behaviour.tokenError = { status: 400, error: 'invalid_grant' } }))
  it('a provider that fails with a server error', () =>
    expectRefused('provider-unavailable', () => { issuer.behaviour.tokenError = { status: 503, error: 'temporarily_unavailable' } }))
  it('a provider that does not answer: refused after the timeout, not a hang and not a 500', () =>
    expectRefused('provider-unavailable', () => { issuer.behaviour.hangToken = true }))
  it('an unverified e-mail does not link an account, a verified one does', async () => {
    await expectRefused('unknown-person', () => {
      issuer.behaviour.claims = { campus_id: 'LS0000001', email: DEMO.ta1, email_verified: false }
    })
    issuer.behaviour.claims = { campus_id: 'LS0000001', email: DEMO.ta1, email_verified: true }
    const { client } = await signInThroughIssuer()
    expect(await signedInUser(client)).toMatchObject({ role: 'ta' })
  })
  it('a disabled account', async () => {
    const student = await world.db.selectFrom('users').select('id').where('email', '=', DEMO.student(9)).executeTakeFirstOrThrow()
    await world.db.updateTable('users').set({ disabledAt: new Date() }).where('id', '=', student.id).execute()
    try {
      await expectRefused('disabled', () => { issuer.behaviour.claims = { campus_id: 'LS2640433', email: DEMO.student(9) } })
    } finally {
      await world.db.updateTable('users').set({ disabledAt: null }).where('id', '=', student.id).execute()
    }
  })
})

describe('a provider that is down', () => {
  it('sends the browser to a clear page at the start instead of a hang or a 500', async () => {
    const down = await world.startServer({ NUXT_CAMPUS_ISSUER: 'http://127.0.0.1:9' })
    const before = await lastAuditId()
    const client = new Client(down.baseUrl)
    const start = await client.get('/auth/campus/start')
    expect(start.status).toBe(302)
    expect(start.headers.get('location')).toBe('/sign-in-problem?reason=provider-unavailable')
    expect(await campusAuditSince(before)).toEqual([{ action: 'sign-in.campus-refused', reason: 'provider-unavailable' }])
    const page = await client.get('/sign-in-problem?reason=provider-unavailable')
    expect(page.text).toContain('The campus sign-in is not answering')
  })
})

describe('password sign-in turned off', () => {
  it('refuses a password for everyone but the break-glass administrator, who still gets in', async () => {
    const locked = await world.startServer({
      NUXT_PASSWORD_SIGN_IN_MODE: 'off', NUXT_PASSWORD_SIGN_IN_BREAK_GLASS: ` ${DEMO.coordinator.toUpperCase()} , nobody@larkspur.example`,
    })
    const options = await new Client(locked.baseUrl).get('/api/auth/options')
    expect(options.body).toMatchObject({ password: 'break-glass', campus: { label: 'Sign in with your campus account' } })

    const student = await new Client(locked.baseUrl).post('/api/auth/login', { email: DEMO.student(3), password: 'halocline-demo' })
    expect(student.status).toBe(403)
    expect(student.refusal.statusMessage).toBe('Password sign-in is turned off here. Use the campus sign-in.')
    // Even the right password of a staff account not named as break-glass.
    expect((await new Client(locked.baseUrl).post('/api/auth/login', { email: DEMO.instructor, password: 'halocline-demo' })).status).toBe(403)

    const admin = new Client(locked.baseUrl)
    expect((await admin.post('/api/auth/login', { email: DEMO.coordinator, password: 'halocline-demo' })).status).toBe(200)
    expect(await signedInUser(admin)).toMatchObject({ role: 'coordinator' })
    // A wrong password is still a wrong password for the administrator.
    expect((await new Client(locked.baseUrl).post('/api/auth/login', { email: DEMO.coordinator, password: 'not-it-at-all' })).status).toBe(401)
  })

  it('an invitation is accepted by the campus sign-in, never with a password nobody could use', async () => {
    const locked = await world.startServer({ NUXT_PASSWORD_SIGN_IN_MODE: 'off' })
    const email = `joiner-${Math.random().toString(36).slice(2, 8)}@larkspur.example`
    const person = await world.db.insertInto('users').values({ email, name: 'Joiner Campus', role: 'student', passwordHash: null })
      .returning('id').executeTakeFirstOrThrow()
    const token = randomBytes(32).toString('base64url')
    const later = new Date(Date.now() + 86_400_000)
    const [open, other] = await world.db.insertInto('invitations')
      .values([{ userId: person.id, tokenHash: hashInvitationToken(token), expiresAt: later },
        { userId: person.id, tokenHash: hashInvitationToken(`${token}-older`), expiresAt: later }])
      .returning('id').execute()

    const view = await new Client(locked.baseUrl).get(`/api/invitations/${token}`)
    expect(view.body).toMatchObject({ email, signIn: 'campus', campusLabel: 'Sign in with your campus account' })
    const page = await new Client(locked.baseUrl).get(`/invite/${token}`)
    expect(page.text).toContain('Join with your campus account')
    expect(page.text).toContain('/auth/campus/start?next=%2F')
    expect(page.text).not.toContain('New password')

    const refused = await new Client(locked.baseUrl).post('/api/invitations/accept', { token, password: 'a long enough sentence 42' })
    expect(refused.status).toBe(403)
    expect(refused.refusal.statusMessage).toBe('Password sign-in is turned off here. Accept the invitation with the campus sign-in.')
    const untouched = await world.db.selectFrom('users').select(['passwordHash', 'campusJoinedAt']).where('id', '=', person.id).executeTakeFirstOrThrow()
    expect(untouched).toEqual({ passwordHash: null, campusJoinedAt: null })

    issuer.behaviour.claims = { campus_id: 'LS0000002', email, email_verified: true }
    const { client, landed } = await signInThroughIssuer(new Client(locked.baseUrl))
    expect(landed).toBe('/')
    expect(await signedInUser(client)).toMatchObject({ id: person.id, role: 'student' })
    const joined = await world.db.selectFrom('users').select(['passwordHash', 'campusJoinedAt']).where('id', '=', person.id).executeTakeFirstOrThrow()
    expect(joined.passwordHash).toBeNull()
    expect(joined.campusJoinedAt).toBeInstanceOf(Date)
    const links = await world.db.selectFrom('invitations').select(['id', 'usedAt']).where('userId', '=', person.id).orderBy('id').execute()
    expect(links.map((l) => [l.id, l.usedAt instanceof Date])).toEqual([[open!.id, true], [other!.id, true]])
    const accepted = await world.db.selectFrom('auditLog').select(['after']).where('action', '=', 'invitation.accept')
      .where('entityId', '=', String(person.id)).execute()
    expect(accepted.map((a) => a.after)).toEqual([{ invitationIds: [open!.id, other!.id], through: 'campus' }])
    // The link is spent: the page says so instead of offering the sign-in again.
    expect((await new Client(locked.baseUrl).get(`/api/invitations/${token}`)).status).toBe(410)
  })

  it('is on for everyone by default', async () => {
    const options = await new Client(server.baseUrl).get('/api/auth/options')
    expect(options.body).toMatchObject({ password: 'everyone' })
    expect((await new Client(server.baseUrl).post('/api/auth/login', { email: DEMO.student(3), password: 'halocline-demo' })).status).toBe(200)
  })
})

describe('the sign-in throttle on the callback', () => {
  it('past the per-address limit a callback is refused with Retry-After and an audit row, before the provider is asked', async () => {
    // Three failed callbacks from this address, then a server whose address limit is three.
    for (let i = 0; i < 3; i++) await new Client(server.baseUrl).get(`/auth/campus/callback?code=x&state=unknown-${i}`)
    const strict = await world.startServer({ NUXT_SIGN_IN_ADDRESS_LIMIT: '3' })
    const before = await lastAuditId()
    const client = new Client(strict.baseUrl)
    const start = await client.get('/auth/campus/start')
    const state = new URL(start.headers.get('location')!).searchParams.get('state')!
    issuer.behaviour.tokenError = { status: 500, error: 'must_not_be_asked' }
    const back = await client.get(`/auth/campus/callback?code=code-1&state=${encodeURIComponent(state)}`)
    expect(back.status).toBe(302)
    expect(back.headers.get('location')).toBe('/sign-in-problem?reason=throttled')
    expect(Number(back.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(await campusAuditSince(before)).toEqual([{ action: 'sign-in.campus-refused', reason: 'throttled' }])
    expect(await signedInUser(client)).toBeUndefined()
  })
})
