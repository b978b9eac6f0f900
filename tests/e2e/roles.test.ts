import { describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'

const ROLES = ['instructor', 'ta', 'coordinator', 'student'] as const
const ACCOUNTS = { instructor: DEMO.instructor, ta: DEMO.ta1, coordinator: DEMO.coordinator, student: DEMO.student(1) }

describe('role gates', () => {
  for (const role of ROLES) {
    it(`${role} reaches its own overview and gets 403 on the others`, async () => {
      const client = await signedIn(ACCOUNTS[role])
      for (const other of ROLES) {
        const reply = await client.get(`/api/overview/${other}`)
        expect(reply.status, `${role} → ${other}`).toBe(other === role ? 200 : 403)
      }
    })
  }

  it('an anonymous caller gets 401, not 400 or 403', async () => {
    const anonymous = new Client()
    expect((await anonymous.get('/api/overview/student')).status).toBe(401)
    expect((await anonymous.get('/api/outbox')).status).toBe(401)
  })

  it('staff-only mail routes refuse students and TAs', async () => {
    expect((await (await signedIn(DEMO.student(2))).get('/api/outbox')).status).toBe(403)
    expect((await (await signedIn(DEMO.ta2)).get('/api/outbox')).status).toBe(403)
    expect((await (await signedIn(DEMO.coordinator)).get('/api/outbox')).status).toBe(200)
  })
})

describe('same-origin rule for changes', () => {
  it('a POST with a foreign Origin gets 403, the same POST from our origin works', async () => {
    const client = await signedIn(DEMO.instructor)
    const foreign = await client.post('/api/outbox/test', undefined, { headers: { origin: 'https://attacker.example' } })
    expect(foreign.status).toBe(403)
    const crossSite = await client.post('/api/outbox/test', undefined, { headers: { 'sec-fetch-site': 'cross-site' } })
    expect(crossSite.status).toBe(403)
    const own = await client.post('/api/outbox/test', undefined, { headers: { origin: client.baseUrl, 'sec-fetch-site': 'same-origin' } })
    expect(own.status).toBe(202)
  })

  it('the login route is guarded too', async () => {
    const reply = await new Client().post('/api/auth/login', { email: DEMO.instructor, password: 'halocline-demo' }, { headers: { origin: 'https://attacker.example' } })
    expect(reply.status).toBe(403)
  })
})

describe('unknown API routes', () => {
  it('answer a JSON 404, and known routes beside them still work', async () => {
    const reply = await new Client().get('/api/no-such-thing/here')
    expect(reply.status).toBe(404)
    expect(reply.body.statusMessage).toBe('No such API route')
    const client = await signedIn(DEMO.student(4))
    expect((await client.get('/api/_auth/session')).body.user.role).toBe('student')
    expect((await client.get('/api/me/lab')).status).toBe(200)
  })
})

describe('security headers', () => {
  it('pages carry a strict CSP and the usual headers', async () => {
    const reply = await new Client().get('/login')
    const csp = reply.headers.get('content-security-policy') ?? ''
    expect(csp).toContain("object-src 'none'")
    expect(csp).toContain("base-uri 'none'")
    expect(csp).toContain("frame-ancestors 'none'")
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/)
    expect(reply.headers.get('x-content-type-options')).toBe('nosniff')
    expect(reply.headers.get('referrer-policy')).toBeTruthy()
  })
})
