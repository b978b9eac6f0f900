import { afterAll, describe, expect, it } from 'vitest'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { allSent, eventually, mailTo, startSmtp, stopSmtp } from '../support/services'

afterAll(closeTestDb)

describe('e-mail through the queue to the SMTP fake', () => {
  it('a queued message arrives once, and the same idempotency key queues nothing new', async () => {
    const user = await createUser('coordinator')
    const client = await signedIn(user.email, user.password)
    const first = await client.post('/api/outbox/test', undefined, { headers: { 'idempotency-key': 'mail-once' } })
    expect(first.status).toBe(202)
    const again = await client.post('/api/outbox/test', undefined, { headers: { 'idempotency-key': 'mail-once' } })
    expect(again.body).toEqual({ id: first.body.id, created: false })

    const [message] = await eventually(async () => {
      const received = await mailTo(user.email)
      return received.length > 0 && received
    })
    expect(message!.subject).toBe('Halocline test message')
    expect(message!.text).toContain('e-mail delivery works')
    expect(message!.html).toContain('<p>')
    // One row for the key, sent in one SMTP conversation: no second copy can be on its way.
    const [row] = await allSent(`test:${user.id}:mail-once`, 1)
    expect(row!.attempts).toBe(1)
    expect(await mailTo(user.email)).toHaveLength(1)

    const outbox = await client.get('/api/outbox')
    expect(outbox.body[0]).toMatchObject({ id: first.body.id, status: 'sent', attempts: 1 })
  })

  it('with the SMTP fake down, the job retries and the message arrives once after it is back', async () => {
    const user = await createUser('instructor')
    const client = await signedIn(user.email, user.password)
    stopSmtp()
    let id: number
    try {
      const queued = await client.post('/api/outbox/test')
      expect(queued.status).toBe(202)
      id = queued.body.id
      await eventually(async () => {
        const row = await testDb().selectFrom('mailMessages').select(['status', 'attempts', 'lastError']).where('id', '=', id).executeTakeFirst()
        return row && row.status === 'retrying' && row.attempts >= 1 && row.lastError
      })
    } finally {
      await startSmtp()
    }
    const received = await eventually(async () => {
      const mail = await mailTo(user.email)
      return mail.length > 0 && mail
    }, 30_000)
    expect(received).toHaveLength(1)
    const row = await eventually(async () => {
      const r = await testDb().selectFrom('mailMessages').select(['status', 'attempts']).where('id', '=', id!).executeTakeFirstOrThrow()
      return r.status === 'sent' && r
    })
    expect(row.attempts).toBeGreaterThan(1)
    // The row is sent, so no attempt is left to bring a second copy.
    expect(await mailTo(user.email)).toHaveLength(1)
  })

  it('the demo mailbox lists what the fake received, for staff only, each their own outbox\'s messages', async () => {
    const instructor = await signedIn(DEMO.instructor)
    const queued = await instructor.post('/api/outbox/test')
    expect(queued.status).toBe(202)
    const mine = await eventually(async () => {
      const list = await instructor.get('/api/demo/mailbox')
      return list.status === 200 && list.body.find((m) => m.to.includes(DEMO.instructor))
    }, 30_000)
    const one = await instructor.get(`/api/demo/mailbox/${mine.file}`)
    expect(one.status).toBe(200)
    expect(one.body.text.length).toBeGreaterThan(0)
    expect((await instructor.get('/api/demo/mailbox/..%2F..%2Fetc%2Fpasswd')).status).toBeGreaterThanOrEqual(400)
    // The coordinator neither lists nor opens the instructor's message (it may hold grades or an invitation link).
    const coordinator = await signedIn(DEMO.coordinator)
    const theirs = await coordinator.get('/api/demo/mailbox')
    expect(theirs.status).toBe(200)
    expect(theirs.body.map((m) => m.file)).not.toContain(mine.file)
    expect((await coordinator.get(`/api/demo/mailbox/${mine.file}`)).status).toBe(404)
    const student = await signedIn(DEMO.student(3))
    expect((await student.get('/api/demo/mailbox')).status).toBe(403)
  })
})
