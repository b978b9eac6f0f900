import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createFaultWorld, type FaultWorld, type ServerProcess } from '../support/fault-world'
import { Client } from '../support/http'
import { eventually } from '../support/services'
import { hashUserPassword } from '../../server/utils/password'

// Two server processes on one database, each keeping account session versions for ten minutes
// here: a logout or a password change through one must still end the old session on the other
// at once (server/utils/account-notices.ts), not when the other's copy expires. Polled briefly,
// never a fixed sleep: without the announcement the other process would answer 200 for 600 s.

let world: FaultWorld
let a: ServerProcess
let b: ServerProcess

beforeAll(async () => {
  world = await createFaultWorld('revoke', { NUXT_SESSION_VERSION_CACHE_SECONDS: '600' })
  ;[a, b] = await Promise.all([world.startServer(), world.startServer()])
})
afterAll(async () => {
  await world?.close()
})

async function signedInOnBoth(password: string) {
  const email = `revoke-${Math.random().toString(36).slice(2, 10)}@pair.test`
  await world.db.insertInto('users').values({ email, name: 'Revoke Student', role: 'student', passwordHash: await hashUserPassword(password) }).execute()
  const onA = new Client(a.baseUrl)
  await onA.login(email, password)
  const onB = new Client(b.baseUrl)
  onB.cookies = new Map(onA.cookies)
  // Both processes have now read, and keep, the account's session version.
  await eventually(async () => (await onB.get('/api/overview/student')).status === 200 && (await onA.get('/api/overview/student')).status === 200, 10_000, 100)
  return { onA, onB }
}

describe('a session ended through one process', () => {
  it('is refused by the other after a logout, long before its cached copy would expire', async () => {
    const { onA, onB } = await signedInOnBoth('a-revoke-test-password-1')
    expect((await onA.post('/api/auth/logout')).status).toBe(204)
    await eventually(async () => (await onB.get('/api/overview/student')).status === 401, 3_000, 50)
  })

  it('is refused by the other after a password change, while the changing session carries on', async () => {
    const password = 'a-revoke-test-password-2'
    const { onA, onB } = await signedInOnBoth(password)
    const changed = await onA.post('/api/account/password', { currentPassword: password, newPassword: 'a-fresh-revoke-password-3' })
    expect(changed.status).toBe(204)
    await eventually(async () => (await onB.get('/api/overview/student')).status === 401, 3_000, 50)
    expect((await onA.get('/api/overview/student')).status).toBe(200)
  })
})
