import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createFaultWorld, deliveredMessageIds, digestMessages, sendDemoDigest, type FaultWorld, type ServerProcess } from '../support/fault-world'
import { Client } from '../support/http'
import { eventually } from '../support/services'
import { hashUserPassword } from '../../server/utils/password'

// Two server processes on one database, as behind a load balancer: what one does, the other
// honours. The session-version cache is set to 1 s so a logout is seen through the other
// process quickly; the test polls until it is, and never sleeps a fixed time.

let world: FaultWorld
let a: ServerProcess
let b: ServerProcess

beforeAll(async () => {
  world = await createFaultWorld('pair', { NUXT_SESSION_VERSION_CACHE_SECONDS: '1' })
  ;[a, b] = await Promise.all([world.startServer(), world.startServer()])
})
afterAll(async () => {
  await world?.close()
})

async function newAccount(role: 'student' | 'coordinator', password: string) {
  const email = `${role}-${Math.random().toString(36).slice(2, 10)}@pair.test`
  await world.db.insertInto('users').values({ email, name: `Pair ${role}`, role, passwordHash: await hashUserPassword(password) }).execute()
  return email
}

describe('two server processes on one database', () => {
  it('a logout through one ends the session on the other', async () => {
    const password = 'a-pair-test-password-7'
    const email = await newAccount('coordinator', password)
    const onA = new Client(a.baseUrl)
    await onA.login(email, password)
    const onB = new Client(b.baseUrl)
    onB.cookies = new Map(onA.cookies)
    expect((await onB.get('/api/overview/coordinator')).status).toBe(200)
    expect((await onA.post('/api/auth/logout')).status).toBe(204)
    // B trusts its copy of the session version for at most the cache lifetime (1 s here).
    await eventually(async () => (await onB.get('/api/overview/coordinator')).status === 401, 10_000, 100)
  })

  it('a digest sent through one goes out once, with both processes working the queue', async () => {
    const { digestIds, recipients } = await sendDemoDigest(world, a)
    const rows = await eventually(async () => {
      const list = await digestMessages(world, digestIds)
      return list.length === recipients && list.every((r) => r.status === 'sent') && list
    }, 60_000, 250)
    const ids = new Set(rows.map((r) => r.id))
    const arrived = deliveredMessageIds(world).filter((m) => ids.has(Number(/^<halocline\.(\d+)\./.exec(m)?.[1])))
    expect(arrived).toHaveLength(recipients)
    expect(new Set(arrived).size).toBe(recipients)
    expect(rows.every((r) => r.attempts === 1)).toBe(true)
    expect([...a.escapedErrors(), ...b.escapedErrors()]).toEqual([])
  })

  // Depends on the sign-in throttle reserving its attempt atomically in the database: checked
  // then recorded in two steps, all 16 requests pass the check before any is recorded.
  it('the sign-in throttle counts across both: 16 wrong passwords at once, at least 6 refused with 429', async () => {
    const email = await newAccount('student', 'the-right-password-9')
    const attempt = (server: ServerProcess) => new Client(server.baseUrl).post('/api/auth/login', { email, password: 'a-wrong-password' })
    const replies = await Promise.all(Array.from({ length: 16 }, (_, i) => attempt(i % 2 ? b : a)))
    const statuses = replies.map((r) => r.status)
    expect(statuses.every((s) => s === 401 || s === 429)).toBe(true)
    // The account limit is 10 failures in the window (server/utils/throttle.ts).
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(6)
  })
})
