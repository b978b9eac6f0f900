import { afterAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { eventually } from '../support/services'

afterAll(closeTestDb)

describe('sign-in', () => {
  it('signs in a demo account and returns the public user', async () => {
    const client = new Client()
    const reply = await client.post('/api/auth/login', { email: 'Instructor@Larkspur.example', password: 'halocline-demo' })
    expect(reply.status).toBe(200)
    expect(reply.body.user).toMatchObject({ email: DEMO.instructor, role: 'instructor' })
    expect(reply.body.user).not.toHaveProperty('passwordHash')
    const cookie = reply.headers.getSetCookie().join('\n')
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).toMatch(/Secure/i)
    // The production build pins the cookie to its origin with the __Host- prefix.
    expect(cookie).toMatch(/^__Host-halocline=/)
    expect(cookie).toMatch(/Path=\//)
    expect(cookie).not.toMatch(/Domain=/i)
  })

  it('gives one message for a wrong password and an unknown e-mail', async () => {
    const user = await createUser('student')
    const wrong = await new Client().post('/api/auth/login', { email: user.email, password: 'not-the-password' })
    const unknown = await new Client().post('/api/auth/login', { email: 'nobody-here@test.example', password: 'whatever-it-is' })
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.refusal.statusMessage).toBe(unknown.refusal.statusMessage)
  })

  it('rejects a malformed body with a 400 naming the field', async () => {
    const reply = await new Client().post('/api/auth/login', { email: 'not-an-email', password: 'x' })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^email:/)
  })

  it('throttles the 11th failure for one account with 429 and Retry-After, and spares other accounts on the address', async () => {
    const victim = await createUser('student')
    const bystander = await createUser('student')
    for (let i = 0; i < 10; i++) {
      const reply = await new Client().post('/api/auth/login', { email: victim.email, password: `wrong-${i}` })
      expect(reply.status).toBe(401)
    }
    const blocked = await new Client().post('/api/auth/login', { email: victim.email, password: victim.password })
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0)
    // Same address (127.0.0.1), different account: still works.
    const other = await new Client().post('/api/auth/login', { email: bystander.email, password: bystander.password })
    expect(other.status).toBe(200)
  })

  it('refuses a disabled account', async () => {
    const user = await createUser('ta')
    await testDb().updateTable('users').set({ disabledAt: new Date() }).where('id', '=', user.id).execute()
    const reply = await new Client().post('/api/auth/login', { email: user.email, password: user.password })
    expect(reply.status).toBe(401)
  })

  it('ends a session that was live when the account is disabled', async () => {
    const user = await createUser('ta')
    const client = await signedIn(user.email, user.password)
    expect((await client.get('/api/overview/ta')).status).toBe(200)
    await testDb().updateTable('users').set({ disabledAt: new Date() }).where('id', '=', user.id).execute()
    // The server caches account state per process for NUXT_SESSION_VERSION_CACHE_SECONDS.
    await eventually(async () => (await client.get('/api/overview/ta')).status === 401, 10_000)
  })
})

describe('sign-out and password change', () => {
  it('logout answers 204 and the old cookie then gives 401', async () => {
    const user = await createUser('coordinator')
    const client = await signedIn(user.email, user.password)
    const stolen = client.clone()
    expect((await client.get('/api/overview/coordinator')).status).toBe(200)
    const logout = await client.post('/api/auth/logout')
    expect(logout.status).toBe(204)
    expect((await stolen.get('/api/overview/coordinator')).status).toBe(401)
  })

  it('a password change keeps this session and kills the others', async () => {
    const user = await createUser('instructor')
    const here = await signedIn(user.email, user.password)
    const elsewhere = await signedIn(user.email, user.password)
    const change = await here.post('/api/account/password', { currentPassword: user.password, newPassword: 'a-brand-new-passphrase' })
    expect(change.status).toBe(204)
    expect((await here.get('/api/overview/instructor')).status).toBe(200)
    expect((await elsewhere.get('/api/overview/instructor')).status).toBe(401)
    const fresh = await new Client().post('/api/auth/login', { email: user.email, password: 'a-brand-new-passphrase' })
    expect(fresh.status).toBe(200)
    const audit = await testDb().selectFrom('auditLog').selectAll().where('action', '=', 'password.change').where('actorId', '=', user.id).execute()
    expect(audit).toHaveLength(1)
  })

  it('refuses short, common and wrong-current passwords with the field named', async () => {
    const user = await createUser('student')
    const client = await signedIn(user.email, user.password)
    const short = await client.post('/api/account/password', { currentPassword: user.password, newPassword: 'short' })
    expect(short.status).toBe(400)
    expect(short.refusal.data?.field).toBe('newPassword')
    const common = await client.post('/api/account/password', { currentPassword: user.password, newPassword: 'password1234' })
    expect(common.status).toBe(422)
    expect(common.refusal.data?.field).toBe('newPassword')
    const wrong = await client.post('/api/account/password', { currentPassword: 'not-my-password', newPassword: 'a-fine-long-passphrase' })
    expect(wrong.status).toBe(422)
    expect(wrong.refusal.data?.field).toBe('currentPassword')
  })
})
