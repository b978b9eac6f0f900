import { afterAll, describe, expect, it } from 'vitest'
import { Client, signedIn } from '../support/http'
import { closeTestDb, createUser } from '../support/db'

// nuxt-auth-utils' own /api/_auth/session: it answers only GET, from the session the server has
// already checked, and mints no cookie; signing out goes through POST /api/auth/logout alone.

afterAll(closeTestDb)

describe('/api/_auth/session', () => {
  it('an anonymous GET answers {} and sets no cookie', async () => {
    const reply = await new Client().get('/api/_auth/session')
    expect(reply.status).toBe(200)
    expect(reply.body).toEqual({})
    expect(reply.headers.getSetCookie()).toEqual([])
    expect(reply.headers.get('cache-control')).toBe('no-store')
  })

  it('a signed-in GET gives the user, and nothing else', async () => {
    const user = await createUser('ta', { name: 'Session Reader' })
    const client = await signedIn(user.email, user.password)
    const reply = await client.get('/api/_auth/session')
    expect(reply.body).toEqual({ user: { id: user.id, name: 'Session Reader', role: 'ta' } })
    expect(reply.headers.getSetCookie()).toEqual([])
  })

  it('DELETE (any spelling of the path) is 405 and ends nothing; logout does, for every copy of the cookie', async () => {
    const user = await createUser('student')
    const client = await signedIn(user.email, user.password)
    const copy = client.clone()
    for (const path of ['/api/_auth/session', '/api/_auth/session/', '/api/_AUTH/Session', '/api/%5Fauth/session']) {
      const reply = await client.request(path, { method: 'DELETE' })
      expect(reply.status, path).toBe(405)
      expect(reply.headers.get('allow')).toBe('GET, HEAD')
      expect(reply.refusal.statusMessage).toBe('Sign out with POST /api/auth/logout')
      expect(reply.headers.getSetCookie()).toEqual([])
    }
    expect((await client.request('/api/_auth/session', { method: 'POST' })).status).toBe(405)
    expect((await copy.get('/api/_auth/session')).body.user.id).toBe(user.id)

    expect((await client.post('/api/auth/logout')).status).toBe(204)
    expect((await copy.get('/api/_auth/session')).body).toEqual({})
    expect((await copy.get('/api/me/lab')).status).toBe(401)
  })
})
