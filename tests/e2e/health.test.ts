import { describe, expect, it } from 'vitest'
import { Client } from '../support/http'
import { eventually, startDatabase, stopDatabase } from '../support/services'

describe('GET /api/health with PostgreSQL going away and coming back', () => {
  it('is 200, then 503 while the cluster is stopped (process stays up), then 200 again', async () => {
    const client = new Client()
    const before = await client.get('/api/health')
    expect(before.status).toBe(200)
    expect(before.body).toEqual({ status: 'ok', database: 'ok' })

    stopDatabase()
    try {
      const down = await client.get('/api/health')
      expect(down.status).toBe(503)
      expect(down.body.database).toBe('down')
      // Other routes that need the database say so plainly instead of crashing.
      const login = await client.post('/api/auth/login', { email: 'someone@test.example', password: 'irrelevant-here' })
      expect(login.status).toBe(503)
    } finally {
      startDatabase()
    }

    const after = await eventually(async () => {
      const reply = await client.get('/api/health')
      return reply.status === 200 && reply
    }, 10_000)
    expect(after.body.database).toBe('ok')
  })
})
