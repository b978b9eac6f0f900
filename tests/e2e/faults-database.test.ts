import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest'
import { Client, type Reply } from '../support/http'
import { closeTestDb, testDb, TEST_PASSWORD } from '../support/db'
import { gcTable, makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import { eventually, startDatabase, stopDatabase } from '../support/services'
import { startServerProcess, type ServerProcess } from '../support/fault-world'

// PostgreSQL restarted under load: students upload GC results at once, each with an
// Idempotency-Key, and retry the same key until the server acknowledges it, as the upload page
// does. A server process of our own (same build, the shared test database) so its log can be
// read: nothing may escape to Node's last-resort handlers. Every acknowledged upload is stored
// exactly once, nothing is half written, the server answers 503 (never 500) while the database
// is gone, and is healthy again within 5 s of the database coming back.

const FILES_PER_STUDENT = 8
let server: ServerProcess
let practical: GcPractical

beforeAll(async () => {
  practical = await makeGcPractical({ students: 8 })
  server = await startServerProcess({ databaseUrl: inject('databaseUrl'), smtpPort: inject('smtpPort') })
})
afterAll(async () => {
  await server?.kill()
  await practical?.cleanup()
  await closeTestDb()
})

interface Upload { key: string, statuses: number[] }

/** One upload, retried with the same key on 503 or a dropped connection, as a client would. */
async function uploadUntilAcknowledged(client: Client, text: string, upload: Upload) {
  const deadline = Date.now() + 60_000
  while (Date.now() < deadline) {
    const status = await uploadGc(client, practical.practicalId, text, { key: upload.key }).then((r) => r.status, () => 0)
    upload.statuses.push(status)
    if (status !== 503 && status !== 0) return
    await new Promise((r) => setTimeout(r, 100))
  }
}

async function signIn(email: string) {
  const client = new Client(server.baseUrl)
  await client.login(email, TEST_PASSWORD)
  return client
}

const health = async () => (await fetch(`${server.baseUrl}/api/health`)).status

describe('PostgreSQL restarted during concurrent uploads', () => {
  it.each(['fast', 'immediate'] as const)('%s shutdown: each acknowledged upload stored once, nothing half written, 503 meanwhile', async (mode) => {
    const clients = await Promise.all(practical.students.map((s) => signIn(s.email)))
    const uploads: Upload[] = []
    const running = Promise.all(clients.map(async (client, i) => {
      for (let n = 0; n < FILES_PER_STUDENT; n++) {
        const upload = { key: `${mode}-${randomUUID()}`, statuses: [] }
        uploads.push(upload)
        await uploadUntilAcknowledged(client, gcTable(practical, { seed: 1000 * i + n + (mode === 'fast' ? 0 : 500) }).text, upload)
      }
    }))
    const acknowledged = () => uploads.filter((u) => [200, 201].includes(u.statuses.at(-1)!)).length
    await eventually(async () => acknowledged() >= 4, 30_000, 20)

    stopDatabase(mode)
    let outage: Record<string, { status: number, message?: string }> = {}
    try {
      // While it is down, routes that need it say so (a short 503 with a message), never 500.
      const probe = clients[0]!
      const reply = async (p: Promise<Reply<unknown>>) => p.then((r) => ({
        status: r.status,
        message: r.refusal?.message ?? r.refusal?.statusMessage,
      }))
      outage = {
        health: { status: await health() },
        upload: await reply(uploadGc(probe, practical.practicalId, gcTable(practical, { seed: 99 }).text, { key: randomUUID() })),
        list: await reply(probe.get(`/api/practicals/${practical.practicalId}/my-submissions`)),
        login: await reply(new Client(server.baseUrl).post('/api/auth/login', { email: practical.students[0]!.email, password: 'not-the-password' })),
      }
    } finally {
      startDatabase()
    }
    const back = Date.now()
    await eventually(async () => (await health()) === 200, 10_000, 50)
    // The issue's own deadline: healthy within 5 s of the database being back.
    expect(Date.now() - back).toBeLessThanOrEqual(5000)
    await running

    for (const [route, answer] of Object.entries(outage)) {
      expect(answer.status, route).toBe(503)
      if (answer.message !== undefined) expect(answer.message, route).toMatch(/database is unavailable/i)
    }
    const statuses = new Set(uploads.flatMap((u) => u.statuses))
    expect([...statuses].filter((s) => ![201, 503].includes(s))).toEqual([])
    expect(uploads.every((u) => u.statuses.at(-1) === 201)).toBe(true)

    const db = testDb()
    const stored = await db.selectFrom('submissions').select(['id', 'idempotencyKey', 'fileId'])
      .where('idempotencyKey', 'in', uploads.map((u) => u.key)).execute()
    expect(stored.map((r) => r.idempotencyKey).sort()).toEqual(uploads.map((u) => u.key).sort())
    const withoutMembers = await db.selectFrom('submissions').select('id').where('practicalId', '=', practical.practicalId)
      .where((eb) => eb.not(eb.exists(eb.selectFrom('submissionMembers').select('submissionId').whereRef('submissionMembers.submissionId', '=', 'submissions.id'))))
      .execute()
    expect(withoutMembers).toEqual([])
    const orphanFiles = await db.selectFrom('files').select('id').where('uploadedBy', 'in', practical.students.map((s) => s.id))
      .where((eb) => eb.not(eb.exists(eb.selectFrom('submissions').select('id').whereRef('submissions.fileId', '=', 'files.id'))))
      .execute()
    expect(orphanFiles).toEqual([])

    expect(server.child.exitCode).toBeNull()
    expect(server.escapedErrors()).toEqual([])
  }, 120_000)
})
