import { afterAll, describe, expect, it } from 'vitest'
import type { ParsedMail } from 'mailparser'
import Papa from 'papaparse'
import { DEMO, signedIn, type Answer } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { allSent, eventually, mailTo, startSmtp, stopSmtp } from '../support/services'
import { insertRichResult, makeNamedCourse } from '../support/results'

afterAll(closeTestDb)

const csvRows = (text: string) => Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data
const fromBase64 = (content: string) => Buffer.from(content, 'base64').toString('utf8')

/**
 * A course with two sections of three named students each; five results with mole %, one with a
 * flag, one late, one excluded with a reason; the last student in S2 has no upload.
 */
async function digestWorld() {
  const world = await makeNamedCourse({ sections: 2, studentsPerSection: 3 })
  const owner = await signedIn(world.owner.email, world.owner.password)
  const summary = (await owner.get(`/api/practicals/${world.practicalId}/summary`)).body
  const products = summary.distribution.map((d) => d.smiles) as string[]
  const mole = (xs: number[]) => products.map((smiles, i) => ({ smiles, percent: xs[i]! }))
  const [a, b, c, d, e] = world.students
  await insertRichResult(world.practicalId, a!, { secondary: 3.2, molePercents: mole([6.1, 24.4, 48.9, 20.6]) })
  await insertRichResult(world.practicalId, b!, { secondary: 3.6, molePercents: mole([5.8, 25.9, 50.2, 18.1]), late: true,
    flags: [{ code: 'retention-drift', severity: 'warning', message: 'Retention times drifted by 0.31 min against the standard run.' }] })
  await insertRichResult(world.practicalId, c!, { secondary: 2.9, molePercents: mole([6.6, 23.0, 46.2, 24.2]), status: 'pending' })
  await insertRichResult(world.practicalId, d!, { secondary: 3.4, molePercents: mole([6.0, 25.0, 49.5, 19.5]) })
  await insertRichResult(world.practicalId, e!, { secondary: 19.0, molePercents: mole([1.0, 10.0, 85.0, 4.0]), excluded: 'Solvent integrated as a product' })
  return { world, owner, products }
}

async function waitForMessages(digestId: number, count: number, timeoutMs = 20_000) {
  return eventually(async () => {
    const rows = await testDb().selectFrom('mailMessages').select(['id', 'status', 'attempts', 'toAddresses', 'scheduledAt', 'lastError'])
      .where('dedupeKey', 'like', `digest:${digestId}:%`).execute()
    return rows.length === count && rows
  }, timeoutMs)
}

function sameMessage(received: ParsedMail, preview: Answer<'/api/practicals/:id/digests/preview'>) {
  expect(received.subject).toBe(preview.subject)
  // mailparser hands back the decoded parts; line ends are the only thing SMTP may change.
  expect(received.text?.replace(/\r\n/g, '\n').trimEnd()).toBe(preview.text.trimEnd())
  expect(received.html).toBe(preview.html)
  expect(received.attachments).toHaveLength(1)
  const [attachment] = received.attachments
  expect(attachment!.filename).toBe(preview.attachments[0]!.filename)
  expect(csvRows(attachment!.content.toString('utf8'))).toEqual(csvRows(fromBase64(preview.attachments[0]!.content)))
}

describe('section digests', () => {
  it('the preview is exactly what arrives, for a student and for staff; the same send twice mails once', async () => {
    const { world, owner } = await digestWorld()
    const s1 = world.sections[0]!.id
    const student = world.students[0]!
    const studentPreview = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${s1}&audience=student&userId=${student.id}`)
    expect(studentPreview.status).toBe(200)
    expect(studentPreview.body.to).toBe(student.email)
    // Class (4 counted results: 3.2, 3.6, 2.9, 3.4), their section, and their own row.
    const rows = csvRows(fromBase64(studentPreview.body.attachments[0]!.content))
    expect(rows.map((r) => r[0])).toEqual(['Row', 'Class', 'Section S1', 'Your result'])
    // The headline figure leads the CSV as it leads the text: the geometric mean, then the median and the arithmetic mean.
    expect(rows[0]!.slice(2, 9)).toEqual(['n', 'Headline statistic', 'Headline', '95 % CI low', '95 % CI high', 'Median', 'Arithmetic mean'])
    expect(Number(rows[1]![2])).toBe(4)
    expect(rows[1]![3]).toBe('Geometric mean')
    expect(Number(rows[1]![4])).toBeCloseTo((3.2 * 3.6 * 2.9 * 3.4) ** (1 / 4), 4)
    expect(Number(rows[1]![8])).toBeCloseTo((3.2 + 3.6 + 2.9 + 3.4) / 4, 4)
    expect(Number(rows[3]![10])).toBeCloseTo(3.2, 4)
    expect(studentPreview.body.text).toMatch(/Class, 2°:1° selectivity per H: geometric mean 3\.26 \(95 % CI \d\.\d\d to \d\.\d\d\), median 3\.30, n = 4\./)
    expect(studentPreview.body.text).toContain('Higher than 1 of the other 3 results in the class.')
    const staffPreview = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${s1}&audience=staff`)
    expect(staffPreview.status).toBe(200)
    expect(staffPreview.body.recipient.userId).toBe(world.owner.id)
    expect(staffPreview.body.text).toContain('flags: retention drift · late')
    expect(staffPreview.body.recipients.map((r) => r.audience).sort()).toEqual(['staff', 'staff', 'student', 'student', 'student'])

    const headers = { 'idempotency-key': `digest-test-${world.practicalId}` }
    const sent = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [s1] }, { headers })
    expect(sent.status).toBe(202)
    expect(sent.body.created).toBe(true)
    const again = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [s1] }, { headers })
    expect(again.status).toBe(202)
    expect(again.body).toEqual({ ...sent.body, created: false })
    const digestId = sent.body.digests[0]!.id
    await waitForMessages(digestId, 5)

    const [toStudent] = await eventually(async () => { const m = await mailTo(student.email); return m.length > 0 && m })
    sameMessage(toStudent!, studentPreview.body)
    const [toOwner] = await eventually(async () => { const m = await mailTo(world.owner.email); return m.length > 0 && m })
    sameMessage(toOwner!, staffPreview.body)
    await eventually(async () => (await mailTo(world.sections[0]!.ta.email)).length > 0)
    // Every message of the digest has left the queue: no copy is still on its way.
    await allSent(`digest:${digestId}:%`, 5)
    for (const s of world.students.slice(0, 3)) expect(await mailTo(s.email)).toHaveLength(1)
    expect(await mailTo(world.owner.email)).toHaveLength(1)

    // The history shows the digest and its five messages, all delivered.
    const history = await eventually(async () => {
      const h = await owner.get(`/api/practicals/${world.practicalId}/digests`)
      return h.body[0]?.delivery === 'sent' && h.body
    })
    expect(history[0]).toMatchObject({ id: digestId, sectionCode: 'S1', recipientCount: 5, counts: { sent: 5, waiting: 0, retrying: 0, failed: 0 } })
  })

  it('with the SMTP fake down during the send, every message arrives exactly once after it is back, and the outbox shows them', async () => {
    const { world, owner } = await digestWorld()
    const s2 = world.sections[1]!.id
    stopSmtp()
    let digestId: number
    try {
      const sent = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [s2] })
      expect(sent.status).toBe(202)
      digestId = sent.body.digests[0]!.id
      await eventually(async () => {
        const rows = await waitForMessages(digestId, 5)
        return rows.every((r) => r.status === 'retrying' && r.attempts >= 1 && r.lastError) && rows
      }, 30_000)
      const outbox = await owner.get('/api/outbox')
      expect(outbox.body.filter((m) => m.kind.startsWith('digest-') && m.status === 'retrying').length).toBeGreaterThanOrEqual(5)
    } finally {
      await startSmtp()
    }
    const recipients = [...world.students.slice(3).map((s) => s.email), world.sections[1]!.ta.email, world.owner.email]
    await eventually(async () => {
      const counts = await Promise.all(recipients.map(async (r) => (await mailTo(r)).length))
      return counts.every((n) => n >= 1)
    }, 45_000)
    // All five are sent, so no retry is left to bring a second copy.
    await allSent(`digest:${digestId!}:%`, 5)
    for (const r of recipients) expect(await mailTo(r), r).toHaveLength(1)
  })

  it('the demo digest leads with the geometric mean; the arithmetic mean follows, marked while flagged runs wait', async () => {
    const practical = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()
    const owner = await signedIn(DEMO.instructor)
    const summary = (await owner.get(`/api/practicals/${practical.id}/summary`)).body
    const section = summary.bySection[0]
    const preview = await owner.get(`/api/practicals/${practical.id}/digests/preview?sectionId=${section!.sectionId}&audience=student`)
    expect(preview.status).toBe(200)
    const text: string = preview.body.text
    const h = summary.headline
    const classLine = text.split('\n').find((l) => l.startsWith('Class, '))!
    expect(classLine).toContain(`geometric mean ${h!.value!.toFixed(2)} (95 % CI ${h!.ci95![0].toFixed(2)} to ${h!.ci95![1].toFixed(2)})`)
    expect(classLine).not.toMatch(/: mean /)
    expect(text.indexOf('geometric mean')).toBeLessThan(text.indexOf('Arithmetic mean'))
    if (h!.meanPulledByOutliers) expect(text).toMatch(/Arithmetic mean \d+\.\d\d, pulled (up|down) by \d+ flagged run/)
    // No interval below zero anywhere in the message.
    expect(text).not.toMatch(/CI -/)
    const staff = await owner.get(`/api/practicals/${practical.id}/digests/preview?sectionId=${section!.sectionId}&audience=staff`)
    expect(staff.body.text).toContain('Outlier test: Generalized ESD (several outliers)')
    expect(staff.body.html).toContain('geometric mean')
  })

  it('a TA previews only their own sections; only the owner sends', async () => {
    const { world } = await digestWorld()
    const ta = world.sections[0]!.ta
    const client = await signedIn(ta.email, ta.password)
    const mine = await client.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[0]!.id}&audience=staff`)
    expect(mine.status).toBe(200)
    expect(mine.body.recipient.userId).toBe(ta.id)
    const rows = csvRows(fromBase64(mine.body.attachments[0]!.content)).slice(1)
    expect(rows.map((r) => r[1])).toEqual(world.students.slice(0, 3).map((s) => s.name))
    for (const s of world.students.slice(3)) {
      expect(mine.body.text).not.toContain(s.name)
      expect(mine.body.html).not.toContain(s.name)
    }
    const other = await client.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[1]!.id}&audience=staff`)
    expect(other.status).toBe(404)
    const send = await client.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [world.sections[0]!.id] })
    expect(send.status).toBe(403)
    const history = await client.get(`/api/practicals/${world.practicalId}/digests`)
    expect(history.status).toBe(200)
    const student = world.students[0]!
    const asStudent = await signedIn(student.email, student.password)
    expect((await asStudent.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[0]!.id}&audience=student`)).status).toBe(403)
    expect((await (await signedIn(DEMO.ta1)).get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[0]!.id}&audience=staff`)).status).toBe(404)
  })

  it('a student’s digest names no other student, in the text, the HTML or the CSV', async () => {
    const { world, owner } = await digestWorld()
    for (const student of world.students) {
      const preview = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${student.sectionId}&audience=student&userId=${student.id}`)
      expect(preview.status).toBe(200)
      const csv = fromBase64(preview.body.attachments[0]!.content)
      expect(preview.body.text).toContain(`Hello ${student.name},`)
      for (const other of world.students.filter((s) => s.id !== student.id)) {
        for (const part of [preview.body.subject, preview.body.text, preview.body.html, csv]) {
          expect(part).not.toContain(other.name)
          expect(part).not.toContain(other.email)
        }
      }
      expect(csvRows(csv)).toHaveLength(4)
    }
    // The excluded student hears why; the one without an upload is told so.
    const excluded = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[1]!.id}&audience=student&userId=${world.students[4]!.id}`)
    expect(excluded.body.text).toContain('left out of the class figures: Solvent integrated as a product')
    const none = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[1]!.id}&audience=student&userId=${world.students[5]!.id}`)
    expect(none.body.text).toContain('We have no accepted or waiting-for-review result from you')
    // Someone who is not a recipient of this section: 404, not somebody else's message.
    const stranger = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[1]!.id}&audience=student&userId=${world.students[0]!.id}`)
    expect(stranger.status).toBe(404)
  })

  it('a scheduled digest waits for its time: the outbox row carries scheduled_at and nothing arrives yet', async () => {
    const { world, owner } = await digestWorld()
    const sendAt = new Date(Date.now() + 2 * 3_600_000)
    const sent = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [world.sections[0]!.id], sendAt: sendAt.toISOString() })
    expect(sent.status).toBe(202)
    expect(sent.body.digests[0]!.scheduledAt).toBe(sendAt.toISOString())
    const rows = await waitForMessages(sent.body.digests[0]!.id, 5)
    for (const r of rows) {
      expect(r.scheduledAt?.toISOString()).toBe(sendAt.toISOString())
      expect(r.status).toBe('queued')
    }
    // A message queued after the digest, due now, goes out: the queue has worked since the
    // digest was queued, and left the digest's messages alone.
    const other = await createUser('coordinator')
    const probe = await (await signedIn(other.email, other.password)).post('/api/outbox/test', undefined, { headers: { 'idempotency-key': 'after-digest' } })
    expect(probe.status).toBe(202)
    await allSent(`test:${other.id}:after-digest`, 1)
    for (const s of world.students.slice(0, 3)) expect(await mailTo(s.email)).toHaveLength(0)
    expect(await mailTo(world.owner.email)).toHaveLength(0)
    const after = await waitForMessages(sent.body.digests[0]!.id, 5)
    expect(after.every((r) => r.status === 'queued' && r.attempts === 0)).toBe(true)
    const history = await owner.get(`/api/practicals/${world.practicalId}/digests`)
    expect(history.body[0]).toMatchObject({ delivery: 'scheduled', scheduledAt: sendAt.toISOString() })
  })

  it('validates the send: sections of this practical, a time in the future', async () => {
    const { world, owner } = await digestWorld()
    const none = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [] })
    expect(none.status).toBe(400)
    expect(none.refusal.statusMessage).toMatch(/^sectionIds:/)
    const elsewhere = await makeNamedCourse({ sections: 1 })
    const stranger = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [elsewhere.sections[0]!.id] })
    expect(stranger.status).toBe(400)
    expect(stranger.refusal.statusMessage).toMatch(/^sectionIds:/)
    const past = await owner.post(`/api/practicals/${world.practicalId}/digests`, { sectionIds: [world.sections[0]!.id], sendAt: '2020-01-01T09:00:00Z' })
    expect(past.status).toBe(400)
    expect(past.refusal.statusMessage).toMatch(/^sendAt:/)
    const badAudience = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${world.sections[0]!.id}&audience=everyone`)
    expect(badAudience.status).toBe(400)
    expect(badAudience.refusal.statusMessage).toMatch(/^audience:/)
    expect(await testDb().selectFrom('mailMessages').select('id').where('createdBy', '=', world.owner.id).execute()).toHaveLength(0)
  })
})
