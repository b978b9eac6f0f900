import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { displayDate } from '../../shared/utils/date-display'

// Molar masses: IUPAC standard atomic weights; densities: CRC Handbook, from memory (both as
// listed in PRODUCT.md).
const M = { chlorobutane: 92.57, so2cl2: 134.96, aibn: 164.21 }
const RHO = { chlorobutane: 0.886, so2cl2: 1.67 }

let instructor: Client
let courseId: number
let sections: Record<string, number>
let p1: number

beforeAll(async () => {
  instructor = await signedIn(DEMO.instructor)
  const course = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
  courseId = course.id
  const rows = await testDb().selectFrom('sections').select(['id', 'code']).where('courseId', '=', courseId).execute()
  sections = Object.fromEntries(rows.map((r) => [r.code, r.id]))
  p1 = (await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()).id
})
afterAll(closeTestDb)

async function libraryIds() {
  const substrate = await testDb().selectFrom('substrates').select('id').where('name', '=', '2,3-dimethylbutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await testDb().selectFrom('methods').select('id').where('reagent', '=', 'so2cl2-azo').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  return { substrateId: substrate.id, methodId: method.id }
}

async function meetingsOf(code: string) {
  const s = await testDb().selectFrom('sections').selectAll().where('id', '=', sections[code]!).executeTakeFirstOrThrow()
  const dates: string[] = []
  for (let t = Date.parse(`${s.firstDate}T00:00:00Z`); t <= Date.parse(`${s.lastDate}T00:00:00Z`); t += 86_400_000) {
    const d = new Date(t)
    const iso = d.toISOString().slice(0, 10)
    if ((d.getUTCDay() || 7) === s.weekday && !s.skippedDates.includes(iso)) dates.push(iso)
  }
  return dates
}

describe('contract routes', () => {
  it('GET /api/courses/:id/practicals lists the demo practicals with exactly the contract fields (and additions)', async () => {
    const reply = await instructor.get(`/api/courses/${courseId}/practicals`)
    expect(reply.status).toBe(200)
    const demo = reply.body.filter((p) => ['Chlorination of 1-chlorobutane', 'Photochlorination of 2,3-dimethylbutane'].includes(p.title))
    expect(demo).toHaveLength(2)
    for (const p of demo) {
      expect(p).toEqual(expect.objectContaining({
        id: expect.any(Number),
        title: expect.any(String),
        substrateSmiles: expect.any(String),
        method: expect.any(String),
      }))
      expect(p.sectionIds.sort()).toEqual(Object.values(sections).sort())
      expect(p.meetingDates).toHaveLength(4)
    }
    const first = demo.find((p) => p.id === p1)
    expect(first!.substrateSmiles).toBe('CCCCCl')
    expect(first!.method).toMatch(/sulfuryl chloride/i)
  })

  it('GET /api/practicals/:id gives a student the windows and their own due date', async () => {
    const student = await signedIn(DEMO.student(1))
    const reply = await student.get(`/api/practicals/${p1}`)
    expect(reply.status).toBe(200)
    expect(reply.body).toEqual(expect.objectContaining({ id: p1, title: 'Chlorination of 1-chlorobutane', substrate: expect.objectContaining({ name: '1-chlorobutane', smiles: 'CCCCCl' }) }))
    // 1-chlorobutane has four distinct monochlorination products (PRODUCT.md).
    expect(reply.body.windows).toHaveLength(4)
    for (const w of reply.body.windows) expect(Object.keys(w).sort()).toEqual(['productSmiles', 'responseFactor', 'rtMax', 'rtMin'])
    const session = await testDb().selectFrom('practicalSessions').select(['dueAt', 'meetingDate']).where('practicalId', '=', p1).where('sectionId', '=', sections.M1!).executeTakeFirstOrThrow()
    expect(reply.body.dueAt).toBe(session.dueAt.toISOString())
    expect(reply.body.sessions.map((s) => s.sectionId)).toEqual([sections.M1])
    // Seven days after the meeting at 23:59 in America/Chicago (the course zone).
    const local = new Intl.DateTimeFormat('en-CA', { timeZone: 'America/Chicago', dateStyle: 'short', timeStyle: 'short', hourCycle: 'h23' }).format(new Date(reply.body.dueAt!))
    const due = new Date(Date.parse(`${session.meetingDate}T00:00:00Z`) + 7 * 86_400_000).toISOString().slice(0, 10)
    expect(local).toBe(`${due}, 23:59`)
  })

  it('an anonymous caller gets 401', async () => {
    expect((await new Client().get(`/api/practicals/${p1}`)).status).toBe(401)
    expect((await new Client().get(`/api/courses/${courseId}/practicals`)).status).toBe(401)
  })
})

describe('scope', () => {
  it('a TA sees only their own sections’ sessions (ta1 has M1 and W1)', async () => {
    const ta = await signedIn(DEMO.ta1)
    const list = await ta.get(`/api/courses/${courseId}/practicals`)
    const first = list.body.find((p) => p.id === p1)
    expect(first!.sectionIds.sort()).toEqual([sections.M1, sections.W1].sort())
    expect(first!.meetingDates).toHaveLength(2)
    const detail = await ta.get(`/api/practicals/${p1}`)
    expect(detail.body.sessions.map((s) => s.sectionCode).sort()).toEqual(['M1', 'W1'])
  })

  it('a student gets 404 for another section’s or another course’s practical', async () => {
    const { substrateId, methodId } = await libraryIds()
    const created = await instructor.post(`/api/courses/${courseId}/practicals`, { title: 'Tuesday-only run', substrateId, methodId })
    expect(created.status).toBe(201)
    const [t1Date] = await meetingsOf('T1')
    expect((await instructor.request(`/api/practicals/${created.body.id}/sessions`, { method: 'PUT', json: { sessions: [{ sectionId: sections.T1, meetingDate: t1Date }] } })).status).toBe(200)
    const m1Student = await signedIn(DEMO.student(1))
    const t1Student = await signedIn(DEMO.student(17))
    expect((await m1Student.get(`/api/practicals/${created.body.id}`)).status).toBe(404)
    expect((await m1Student.get(`/api/practicals/${created.body.id}/card`)).status).toBe(404)
    expect((await t1Student.get(`/api/practicals/${created.body.id}`)).status).toBe(200)
    expect((await m1Student.get(`/api/courses/${courseId}/practicals`)).body.map((p) => p.id)).not.toContain(created.body.id)

    const db = testDb()
    const other = await db.insertInto('courses').values({ code: 'CHEM 9990', title: 'Another course', term: 'Test term', rubric: '[]' }).returning('id').executeTakeFirstOrThrow()
    const practical = await db.insertInto('practicals').values({ courseId: other.id, title: 'Elsewhere', substrateId, methodId }).returning('id').executeTakeFirstOrThrow()
    expect((await m1Student.get(`/api/practicals/${practical.id}`)).status).toBe(404)
    expect((await m1Student.get(`/api/courses/${other.id}/practicals`)).status).toBe(404)
    // The demo instructor does not own that course either.
    expect((await instructor.get(`/api/practicals/${practical.id}`)).status).toBe(404)
    // Leave the shared demo world as it was for the other files.
    await db.deleteFrom('courses').where('id', '=', other.id).execute()
    expect((await instructor.request(`/api/practicals/${created.body.id}`, { method: 'DELETE' })).status).toBe(204)
  })

  it('the coordinator reads but cannot change (403)', async () => {
    const coordinator = await signedIn(DEMO.coordinator)
    expect((await coordinator.get(`/api/practicals/${p1}`)).status).toBe(200)
    expect((await coordinator.get(`/api/practicals/${p1}/card`)).body.audience).toBe('staff')
    expect((await coordinator.request(`/api/practicals/${p1}`, { method: 'PATCH', json: { title: 'Nope' } })).status).toBe(403)
    expect((await coordinator.request(`/api/practicals/${p1}/sessions`, { method: 'PUT', json: { sessions: [] } })).status).toBe(403)
    expect((await coordinator.request(`/api/practicals/${p1}`, { method: 'DELETE' })).status).toBe(403)
    const { substrateId, methodId } = await libraryIds()
    expect((await coordinator.post(`/api/courses/${courseId}/practicals`, { title: 'Nope', substrateId, methodId })).status).toBe(403)
  })
})

describe('setting up a practical', () => {
  it('creates with a prefilled scale, checks meetings row by row, saves items, updates and deletes, auditing each change', async () => {
    const { substrateId, methodId } = await libraryIds()
    const bad = await instructor.post(`/api/courses/${courseId}/practicals`, { title: '', substrateId, methodId })
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^title:/)

    const created = await instructor.post(`/api/courses/${courseId}/practicals`, { title: 'Scale test', substrateId, methodId })
    expect(created.status).toBe(201)
    const id = created.body.id
    expect(created.body.workUnit).toBe('pair')
    expect(created.body.items.map((i) => [i.role, i.basis, i.amount])).toEqual([
      ['substrate', 'mmol', 10], ['halogenating-agent', 'equivalents', 1], ['initiator', 'mol-percent', 2], ['wash', 'mL', 20], ['drying-agent', 'g', 1],
    ])
    expect(created.body.items[1]).toMatchObject({ smiles: 'O=S(=O)(Cl)Cl', density: 1.67 })

    const [m1] = await meetingsOf('M1')
    const rDates = await meetingsOf('R1')
    const holiday = (await testDb().selectFrom('sections').select('skippedDates').where('id', '=', sections.R1!).executeTakeFirstOrThrow()).skippedDates[0]!
    const notAMeeting = await instructor.request(`/api/practicals/${id}/sessions`, { method: 'PUT', json: { sessions: [{ sectionId: sections.M1, meetingDate: m1 }, { sectionId: sections.R1, meetingDate: holiday }] } })
    expect(notAMeeting.status).toBe(400)
    expect(notAMeeting.refusal.statusMessage).toBe(`sessions.1.meetingDate: ${displayDate(holiday)} is not a meeting of section R1`)
    const foreign = await instructor.request(`/api/practicals/${id}/sessions`, { method: 'PUT', json: { sessions: [{ sectionId: 999_999, meetingDate: m1 }] } })
    expect(foreign.refusal.statusMessage).toMatch(/^sessions\.0\.sectionId:/)

    const ok = await instructor.request(`/api/practicals/${id}/sessions`, { method: 'PUT', json: { sessions: [{ sectionId: sections.M1, meetingDate: m1 }, { sectionId: sections.R1, meetingDate: rDates[1], dueAt: '2099-01-01T12:00:00Z' }] } })
    expect(ok.status).toBe(200)
    expect(ok.body.map((s) => s.sectionCode).sort()).toEqual(['M1', 'R1'])
    expect(ok.body.find((s) => s.sectionCode === 'R1')!.dueAt).toBe('2099-01-01T12:00:00.000Z')

    const items = [
      { role: 'substrate', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', molarMass: 86.18, density: 0.662, basis: 'mmol', amount: 5 },
      { role: 'halogenating-agent', name: 'sulfuryl chloride', smiles: 'O=S(=O)(Cl)Cl', density: 1.67, basis: 'equivalents', amount: 1.2 },
    ]
    const badItems = await instructor.request(`/api/practicals/${id}/items`, { method: 'PUT', json: { items: [items[0], { ...items[1], smiles: 'not a smiles((' }] } })
    expect(badItems.status).toBe(400)
    expect(badItems.refusal.statusMessage).toMatch(/^items\.1\.smiles:/)
    const saved = await instructor.request(`/api/practicals/${id}/items`, { method: 'PUT', json: { items } })
    expect(saved.status).toBe(200)
    // The molar mass came from the SMILES: SO2Cl2 134.96 g/mol (IUPAC); 1.2 × 5 mmol = 6 mmol = 0.8098 g.
    expect(saved.body.items[1]!.molarMass).toBeCloseTo(M.so2cl2, 1)
    expect(saved.body.quantities.items[1]!.grams).toBeCloseTo((6 * M.so2cl2) / 1000, 3)

    const patched = await instructor.request(`/api/practicals/${id}`, { method: 'PATCH', json: { title: 'Scale test, renamed', workUnit: 'student' } })
    expect(patched.status).toBe(200)
    expect(patched.body).toMatchObject({ title: 'Scale test, renamed', workUnit: 'student' })

    const actions = (await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'practical').where('entityId', '=', String(id)).orderBy('id').execute()).map((r) => r.action)
    expect(actions).toEqual(['practical.create', 'practical.sessions', 'practical.items', 'practical.update'])

    expect((await instructor.request(`/api/practicals/${id}`, { method: 'DELETE' })).status).toBe(204)
    expect((await instructor.get(`/api/practicals/${id}`)).status).toBe(404)
    expect(await testDb().selectFrom('practicalItems').select('id').where('practicalId', '=', id).execute()).toEqual([])
    const deletion = await testDb().selectFrom('auditLog').select('action').where('entityId', '=', String(id)).where('action', '=', 'practical.delete').executeTakeFirst()
    expect(deletion).toBeTruthy()
  })
})

describe('procedure card', () => {
  it('gives student01 (M1) their meeting, station, partner and quantities for practical 1', async () => {
    const student = await signedIn(DEMO.student(1))
    const reply = await student.get(`/api/practicals/${p1}/card`)
    expect(reply.status).toBe(200)
    const card = reply.body
    expect(card.audience).toBe('student')
    // Demo roster order pairs student01 and student02 on station 1 of M1.
    expect(card.student).toMatchObject({ sectionCode: 'M1', station: 1, seat: 1 })
    expect(card.student!.partners).toHaveLength(1)
    expect(card.sessions).toHaveLength(1)
    expect(card.sessions[0]).toMatchObject({ sectionCode: 'M1', room: 'Bellweather Hall 214' })
    const [substrate, agent, initiator] = card.quantities.items
    // 10 mmol 1-chlorobutane: 10 × 92.57 / 1000 = 0.926 g; ÷ 0.886 g/mL = 1.045 mL.
    expect(substrate!.grams).toBeCloseTo((10 * M.chlorobutane) / 1000, 3)
    expect(substrate!.millilitres).toBeCloseTo((10 * M.chlorobutane) / 1000 / RHO.chlorobutane, 3)
    // 1.0 equiv SO2Cl2: 10 mmol × 134.96 = 1.350 g; ÷ 1.67 g/mL = 0.808 mL.
    expect(agent!.grams).toBeCloseTo((10 * M.so2cl2) / 1000, 3)
    expect(agent!.millilitres).toBeCloseTo((10 * M.so2cl2) / 1000 / RHO.so2cl2, 3)
    // 2 mol % AIBN: 0.2 mmol × 164.21 = 32.8 mg, a solid: no volume.
    expect(initiator!.grams! * 1000).toBeCloseTo(0.2 * M.aibn, 1)
    expect(initiator!.millilitres).toBeNull()
    expect(card.products).toHaveLength(4)
    expect(card.products.reduce((s, p) => s + p.percent, 0)).toBeCloseTo(100, 6)
    expect(card.hazards).toEqual(['sulfuryl-chloride', 'azo-initiator', 'halogenated-waste'])
    expect(card.planningNote).toMatch(/planning aids/)
    expect(card.planningNote).toMatch(/chemical hygiene plan/)
    expect(card.method).toMatchObject({ reagent: 'so2cl2-azo', temperatureC: expect.any(Number), source: expect.any(String) })
  })

  it('gives staff the card per work unit, without a personal station', async () => {
    const ta = await signedIn(DEMO.ta2)
    const card = (await ta.get(`/api/practicals/${p1}/card`)).body
    expect(card.audience).toBe('staff')
    expect(card.student).toBeNull()
    expect(card.sessions.map((s) => s.sectionCode).sort()).toEqual(['R1', 'T1'])
    expect(card.quantities.items[0]!.mmol).toBe(10)
  })

  it('shows chlorine for practical 2 in grams only, at 0.5 equiv', async () => {
    const p2 = (await testDb().selectFrom('practicals').select('id').where('title', '=', 'Photochlorination of 2,3-dimethylbutane').executeTakeFirstOrThrow()).id
    const card = (await instructor.get(`/api/practicals/${p2}/card`)).body
    const chlorine = card.quantities.items.find((i) => i.role === 'halogenating-agent')
    // 0.5 equiv of 10 mmol = 5 mmol × 70.90 g/mol (2 × 35.45, IUPAC conventional weight) = 0.3545 g.
    expect(chlorine).toMatchObject({ gas: true, millilitres: null, basis: 'equivalents', amount: 0.5 })
    expect(chlorine!.grams).toBeCloseTo(0.3545, 2)
    expect(card.hazards).toContain('chlorine')
  })
})
