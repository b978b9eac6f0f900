import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { startServerProcess, type ServerProcess } from '../support/fault-world'
import { gcTable, makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import { Client } from '../support/http'
import { TEST_PASSWORD } from '../support/db'

// The upload's Server-Timing header (NUXT_SERVER_TIMING=1, what npm run bench reads): a second
// server on the test database with the setting on, beside the test world's own with it off.
let gc: GcPractical
let timed: ServerProcess

beforeAll(async () => {
  gc = await makeGcPractical({ students: 2 })
  timed = await startServerProcess({ databaseUrl: inject('databaseUrl'), smtpPort: inject('smtpPort'), env: { NUXT_SERVER_TIMING: '1' } })
})
afterAll(async () => {
  await timed?.kill()
  await gc?.cleanup()
})

/** `name;dur=1.23;desc="…"` items (W3C Server Timing) as name → duration. */
function metrics(header: string) {
  return new Map(header.split(', ').map((item) => {
    const [name, ...params] = item.split(';')
    const dur = params.find((p) => p.startsWith('dur='))
    return [name!, Number(dur?.slice(4))] as const
  }))
}

describe('Server-Timing on uploads', () => {
  it('tells where a stored upload spent its time when the setting is on', async () => {
    const student = new Client(timed.baseUrl)
    await student.login(gc.students[0]!.email, TEST_PASSWORD)
    const reply = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 21 }).text)
    expect(reply.status).toBe(201)
    const timing = metrics(reply.headers.get('server-timing') ?? '')
    expect([...timing.keys()].sort()).toEqual(['access', 'body', 'engine', 'handler', 'store', 'unit', 'worker'])
    for (const ms of timing.values()) expect(ms).toBeGreaterThanOrEqual(0)
    // The worker's own time is inside the engine's span, and every span inside the handler's.
    expect(timing.get('worker')!).toBeLessThanOrEqual(timing.get('engine')!)
    for (const name of ['body', 'access', 'engine', 'unit', 'store']) expect(timing.get(name)!).toBeLessThanOrEqual(timing.get('handler')!)
  }, 60_000)

  it('sends no Server-Timing while the setting is off', async () => {
    const student = await gc.signIn(gc.students[1]!)
    const reply = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 22 }).text)
    expect(reply.status).toBe(201)
    expect(reply.headers.get('server-timing')).toBeNull()
  })
})
