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
    const own = await client.post('/api/outbox/test', undefined, { headers: { 'origin': client.baseUrl, 'sec-fetch-site': 'same-origin' } })
    expect(own.status).toBe(202)
    // No Origin, but a Referer from elsewhere (an older browser): refused too; our own Referer passes.
    const referred = await client.post('/api/outbox/test', undefined, { headers: { referer: 'https://attacker.example/page' } })
    expect(referred.status).toBe(403)
    const ownReferer = await client.post('/api/outbox/test', undefined, { headers: { referer: `${client.baseUrl}/outbox` } })
    expect(ownReferer.status).toBe(202)
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
    expect(reply.refusal.statusMessage).toBe('No such API route')
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

describe('requests the server must refuse cleanly', () => {
  it('an id past PostgreSQL\'s integer range or an impossible date is a 400, not a 500', async () => {
    const instructor = await signedIn(DEMO.instructor)
    const big = await instructor.get('/api/courses/2147483648')
    expect(big.status).toBe(400)
    expect(big.refusal.statusMessage).toMatch(/out of range/)
    expect((await instructor.get('/api/submissions/2147483648')).status).toBe(400)
    expect((await instructor.get('/api/courses/2147483647')).status).toBe(404)
    const date = await instructor.get('/api/schedule?from=2026-02-31&to=2026-03-01')
    expect(date.status).toBe(400)
    expect(date.refusal.statusMessage).toMatch(/^from: Not a calendar date/)
  })

  it('a JSON body over 1 MB is refused with 413 unread, declared or chunked, even before sign-in', async () => {
    const huge = JSON.stringify({ email: 'x@larkspur.example', password: 'p'.repeat(1_100_000) })
    const declared = await new Client().request('/api/auth/login', { method: 'POST', body: huge, headers: { 'content-type': 'application/json' } })
    expect(declared.status).toBe(413)
    const bytes = new TextEncoder().encode(huge)
    const stream = new ReadableStream({
      start(controller) {
        for (let i = 0; i < bytes.length; i += 64 * 1024) controller.enqueue(bytes.slice(i, i + 64 * 1024))
        controller.close()
      },
    })
    const chunked = await new Client().request('/api/auth/login', { method: 'POST', body: stream, headers: { 'content-type': 'application/json' }, duplex: 'half' })
    expect(chunked.status).toBe(413)
    // The connection closes after the refusal, so no later request lands on a half-read socket.
    expect(chunked.headers.get('connection')).toBe('close')
    expect((await new Client().get('/api/health')).status).toBe(200)
  })

  it('a form-encoded body is not read as fields (an HTML form from elsewhere cannot post one)', async () => {
    const form = await new Client().request('/api/auth/login', {
      method: 'POST', body: `email=${encodeURIComponent(DEMO.instructor)}&password=halocline-demo`,
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    })
    expect(form.status).toBe(400)
  })

  it('reactivities too large to add up, or all zero, are a 400 naming the field', async () => {
    const student = await signedIn(DEMO.student(4))
    const huge = await student.post('/api/chemistry/analyze', { smiles: 'CCC', reactivity: { primary: 1e308, secondary: 1e308, tertiary: 1e308 } })
    expect(huge.status).toBe(400)
    expect(huge.refusal.statusMessage).toMatch(/^reactivity\.primary: /)
    const zero = await student.post('/api/chemistry/analyze', { smiles: 'CCC', reactivity: { primary: 0, secondary: 0, tertiary: 0 } })
    expect(zero.status).toBe(400)
  })
})
