import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, expectOk, signedIn, type Answer } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { allSent, eventually, mailTo } from '../support/services'

// Molar mass: IUPAC standard atomic weights (2,3-dimethylbutane 86.18 g/mol, as in PRODUCT.md).
// Density: CRC Handbook, from memory (2,3-dimethylbutane 0.662 g/mL).
const M_DMB = 86.18
const RHO_DMB = 0.662
const DAY = 86_400_000

const dateOf = (t: number) => new Date(t).toISOString().slice(0, 10)
const plusDays = (date: string, days: number) => dateOf(Date.parse(`${date}T00:00:00Z`) + days * DAY)
const today = dateOf(Date.now())
/** A Monday eight or more weeks ahead: no demo meeting is that far out. */
const base = (() => {
  const start = Date.parse(`${today}T00:00:00Z`) + 56 * DAY
  const weekday = new Date(start).getUTCDay() || 7
  return dateOf(start + ((8 - weekday) % 7) * DAY)
})()

let coordinator: Client
const uid = randomUUID().slice(0, 8)

beforeAll(async () => { coordinator = await signedIn(DEMO.coordinator) })
afterAll(closeTestDb)

describe('who may use the stockroom', () => {
  const READS = ['/api/stockroom/forecast?from=2027-01-01&to=2027-01-28', '/api/stockroom/reagents', '/api/stockroom/overview', '/api/stockroom/orders', '/api/stockroom/settings']

  it('students and TAs get 403 on every stockroom route, reads and writes; anonymous callers 401', async () => {
    const reagent = await testDb().selectFrom('reagents').select('id').orderBy('id').executeTakeFirstOrThrow()
    const lot = await testDb().selectFrom('reagentLots').select('id').orderBy('id').executeTakeFirstOrThrow()
    const order = await testDb().selectFrom('orderSheets').select('id').orderBy('id').executeTakeFirstOrThrow()
    const item = await testDb().selectFrom('practicalItems').select('id').orderBy('id').executeTakeFirstOrThrow()
    const calls: Array<['GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE', string, unknown?]> = [
      ...READS.map((path): ['GET', string] => ['GET', path]),
      ['GET', `/api/stockroom/reagents/${reagent.id}`],
      ['GET', `/api/stockroom/orders/${order.id}`],
      ['GET', `/stockroom/orders/${order.id}/sheet.csv`],
      ['POST', '/api/stockroom/reagents', { name: 'x', physicalState: 'solid', containerSize: 1, unit: 'g' }],
      ['PATCH', `/api/stockroom/reagents/${reagent.id}`, { name: 'x' }],
      ['DELETE', `/api/stockroom/reagents/${reagent.id}`],
      ['POST', `/api/stockroom/reagents/${reagent.id}/lots`, {}],
      ['PATCH', `/api/stockroom/lots/${lot.id}`, { location: 'x' }],
      ['POST', `/api/stockroom/lots/${lot.id}/usage`, {}],
      ['PUT', `/api/stockroom/items/${item.id}/reagent`, { reagentId: null }],
      ['POST', '/api/stockroom/orders', {}],
      ['PATCH', `/api/stockroom/orders/${order.id}`, { title: 'x' }],
      ['DELETE', `/api/stockroom/orders/${order.id}`],
      ['POST', `/api/stockroom/orders/${order.id}/send`],
      ['POST', `/api/stockroom/orders/${order.id}/receive`, {}],
      ['PUT', '/api/stockroom/settings', { rinseMlPerUnit: 1 }],
    ]
    for (const email of [DEMO.student(3), DEMO.ta1]) {
      const client = await signedIn(email)
      for (const [method, path, json] of calls) {
        const reply = await client.request(path, { method, json })
        expect(reply.status, `${email} ${method} ${path}`).toBe(403)
      }
    }
    for (const path of READS) expect((await new Client().get(path)).status, path).toBe(401)
  })

  it('an instructor reads the catalog and the forecast, and changes nothing', async () => {
    const instructor = await signedIn(DEMO.instructor)
    for (const path of ['/api/stockroom/forecast?from=2027-01-01&to=2027-01-28', '/api/stockroom/reagents', '/api/stockroom/settings']) {
      expect((await instructor.get(path)).status, path).toBe(200)
    }
    expect((await instructor.get('/api/stockroom/orders')).status).toBe(403)
    expect((await instructor.get('/api/stockroom/overview')).status).toBe(403)
    expect((await instructor.post('/api/stockroom/reagents', { name: 'x', physicalState: 'solid', containerSize: 1, unit: 'g' })).status).toBe(403)
  })

  it('the coordinator cannot reach course or section rosters', async () => {
    const course = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
    const section = await testDb().selectFrom('sections').select('id').where('courseId', '=', course.id).orderBy('code').executeTakeFirstOrThrow()
    expect((await coordinator.get(`/api/courses/${course.id}/roster/imports`)).status).toBe(403)
    expect((await coordinator.post(`/api/courses/${course.id}/roster/preview`, {})).status).toBe(403)
    expect((await coordinator.get(`/api/sections/${section.id}/roster`)).status).toBe(403)
  })

  it('the coordinator gets 403 on every grade and submission route', async () => {
    const practical = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()
    const submission = await testDb().selectFrom('submissions').select('id').where('practicalId', '=', practical.id).executeTakeFirstOrThrow()
    const reads = [
      `/api/practicals/${practical.id}/queue`, `/api/practicals/${practical.id}/summary`, `/api/practicals/${practical.id}/my-submissions`,
      `/api/submissions/${submission.id}`, `/api/review/practicals`, `/practicals/${practical.id}/grades.csv`, `/submissions/${submission.id}/file`,
      `/api/practicals/${practical.id}/digests`,
    ]
    for (const path of reads) expect((await coordinator.get(path)).status, path).toBe(403)
    const writes = [
      `/api/submissions/${submission.id}/review`, `/api/submissions/${submission.id}/exclusion`, `/api/practicals/${practical.id}/queue/accept`,
      `/api/practicals/${practical.id}/submissions`, `/api/practicals/${practical.id}/release`,
    ]
    for (const path of writes) expect((await coordinator.post(path, {})).status, path).toBe(403)
  })
})

describe('the demo stockroom', () => {
  it('the forecast for the next four weeks answers the contract and finds practical 2 short of 2,3-dimethylbutane', async () => {
    const to = plusDays(today, 27)
    const demo = await testDb().selectFrom('courses').select('id').where('code', '=', 'CHEM 2240').executeTakeFirstOrThrow()
    const forecast = await expectOk(coordinator.get(`/api/stockroom/forecast?from=${today}&to=${to}&courseId=${demo.id}`))
    expect(typeof forecast.halogenatedWasteMl).toBe('number')
    for (const line of forecast.lines) {
      expect(Object.keys(line)).toEqual(expect.arrayContaining(['reagentId', 'name', 'unit', 'required', 'onHand', 'shortfall', 'containers', 'containerSize']))
    }
    const p2 = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Photochlorination of 2,3-dimethylbutane').executeTakeFirstOrThrow()
    const sessions = await testDb().selectFrom('practicalSessions').select(['sectionId', 'meetingDate']).where('practicalId', '=', p2.id).execute()
    const counted = sessions.filter((s) => s.meetingDate >= today && s.meetingDate <= to)
    // Work units from the demo roster itself: distinct occupied stations per section.
    const enrolled = await testDb().selectFrom('enrollments').select(['sectionId', 'station']).where('sectionId', 'in', counted.map((s) => s.sectionId)).where('status', '=', 'active').execute()
    const units = counted.reduce((n, s) => n + new Set(enrolled.filter((e) => e.sectionId === s.sectionId).map((e) => e.station)).size, 0)
    expect(units).toBeGreaterThan(0)
    const line = forecast.lines.find((l) => l.name === '2,3-dimethylbutane')
    // units × (10 mmol × 86.18 g/mol ÷ 0.662 g/mL) × 1.15; on hand only the opened 25 mL bottle's
    // 12 mL left (the other bottle expires first); 25 mL bottles.
    const required = units * (10 * M_DMB / 1000 / RHO_DMB) * 1.15
    expect(line!.required).toBeCloseTo(required, 2)
    expect(line!.onHand).toBeCloseTo(12, 3)
    expect(line!.notCounted).toBeCloseTo(25, 3)
    expect(line!.containers).toBe(Math.ceil((required - 12) / 25))
    // Every item of the demo practicals is linked to the catalog by the seed.
    expect(forecast.unlinkedItems.filter((i) => i.practicalId === p2.id)).toEqual([])
  })

  it('the overview lists the shortfalls, low stock, the expired sulfuryl chloride and the order in play', async () => {
    const overview = await expectOk(coordinator.get('/api/stockroom/overview'))
    expect(overview.shortfalls.map((l) => l.name)).toContain('2,3-dimethylbutane')
    expect(overview.lowStock.map((r) => r.name)).toEqual(expect.arrayContaining(['chlorine', 'magnesium sulfate, anhydrous']))
    expect(overview.expiring).toContainEqual(expect.objectContaining({ reagentName: 'sulfuryl chloride', expired: true, remaining: 40 }))
    expect(overview.orders.map((o) => o.status)).toContain('sent')
  })
})

interface HandCase { courseId: number, alkaneId: number, dryingId: number, owner: { email: string, password: string } }

/** Its own course: sections A (12 students in pairs), B (7: five placed, two not) and C (a skipped date). */
let handCases = 0
async function buildHandCase(): Promise<HandCase> {
  const db = testDb()
  const tag = `${uid}-${++handCases}`
  const owner = await createUser('instructor')
  const course = await db.insertInto('courses').values({ code: `STOCK ${tag}`, title: 'Forecast check', term: 'Test', rubric: '[]', createdBy: owner.id }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('courseOwners').values({ courseId: course.id, userId: owner.id }).execute()
  const section = (code: string, weekday: number, skippedDates: string[] = []) => db.insertInto('sections').values({
    courseId: course.id, code, weekday, startTime: '13:00', endTime: '15:50', room: `Test room ${tag} ${code}`, hoodStations: 12,
    firstDate: base, lastDate: plusDays(base, 20), skippedDates,
  }).returning('id').executeTakeFirstOrThrow()
  const a = await section('A', 1)
  const b = await section('B', 3)
  const c = await section('C', 4, [plusDays(base, 3)])
  const enrol = async (sectionId: number, stations: Array<number | null>) => {
    for (const [i, station] of stations.entries()) {
      const student = await createUser('student')
      await db.insertInto('enrollments').values({ courseId: course.id, sectionId, userId: student.id, station, seat: station === null ? null : (i % 2) + 1 }).execute()
    }
  }
  await enrol(a.id, [1, 1, 2, 2, 3, 3, 4, 4, 5, 5, 6, 6])
  // Stations 1 and 2 full, station 3 half, two not yet placed: 3 + ceil(2 / 2) = 4 pairs.
  await enrol(b.id, [1, 1, 2, 2, 3, null, null])
  await enrol(c.id, [1, 1, 2, 2])

  const alkane = await expectOk(coordinator.post('/api/stockroom/reagents', {
    name: `test alkane ${tag}`, smiles: 'CC(C)C(C)C', physicalState: 'liquid', density: RHO_DMB, containerSize: 25, unit: 'mL',
    hazardCodes: ['H225', 'H304'], signalWord: 'Danger', supplierName: 'Test supplier', supplierEmail: `alkane-${tag}@supplier.example`,
  }), 201)
  expect(alkane.molarMass).toBeCloseTo(86.178, 2)
  const drying = await expectOk(coordinator.post('/api/stockroom/reagents', {
    name: `test drying agent ${tag}`, formula: 'MgSO4', molarMass: 120.37, physicalState: 'solid', containerSize: 500, unit: 'g', overagePercent: 10,
    supplierName: 'Test supplier', supplierEmail: `alkane-${tag}@supplier.example`, shelfLifeMonths: 60,
  }), 201)
  const lot = (body: Record<string, unknown>) => expectOk(coordinator.post(`/api/stockroom/reagents/${alkane.id}/lots`, { unit: 'mL', receivedOn: plusDays(today, -30), ...body }), 201)
  await lot({ quantity: 10, lotCode: 'L1', expiresOn: plusDays(base, 4) })
  await lot({ quantity: 6, lotCode: 'L2', expiresOn: plusDays(today, -1) })
  await lot({ quantity: 3, lotCode: 'L3' })

  const substrate = await db.selectFrom('substrates').select('id').where('name', '=', '2,3-dimethylbutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const method = await db.selectFrom('methods').select('id').where('reagent', '=', 'cl2-light').where('ownerId', 'is', null).executeTakeFirstOrThrow()
  const practical = await db.insertInto('practicals').values({ courseId: course.id, title: `Forecast practical ${tag}`, substrateId: substrate.id, methodId: method.id, workUnit: 'pair' }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('practicalItems').values([
    { practicalId: practical.id, position: 0, role: 'substrate', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', molarMass: M_DMB, density: RHO_DMB, basis: 'mmol', amount: 10, reagentId: alkane.id },
    { practicalId: practical.id, position: 1, role: 'halogenating-agent', name: 'chlorine', smiles: 'ClCl', molarMass: 70.9, density: null, basis: 'equivalents', amount: 0.5 },
    { practicalId: practical.id, position: 2, role: 'drying-agent', name: 'drying agent', smiles: null, molarMass: null, density: null, basis: 'g', amount: 1 },
  ]).execute()
  const dryingItem = await db.selectFrom('practicalItems').select('id').where('practicalId', '=', practical.id).where('role', '=', 'drying-agent').executeTakeFirstOrThrow()
  // Linked through the route, as the coordinator does from the forecast.
  await expectOk(coordinator.request(`/api/stockroom/items/${dryingItem.id}/reagent`, { method: 'PUT', json: { reagentId: drying.id } }))
  const dueAt = new Date(`${plusDays(base, 30)}T12:00:00Z`)
  await db.insertInto('practicalSessions').values([
    { practicalId: practical.id, sectionId: a.id, meetingDate: base, dueAt },
    { practicalId: practical.id, sectionId: b.id, meetingDate: plusDays(base, 9), dueAt },
    { practicalId: practical.id, sectionId: c.id, meetingDate: plusDays(base, 3), dueAt },
  ]).execute()
  return { courseId: course.id, alkaneId: alkane.id, dryingId: drying.id, owner }
}

describe('the forecast on a hand-computed case, through the server', () => {
  let hand: HandCase
  let forecast: Answer<'/api/stockroom/forecast'>
  const from = () => base
  const to = () => plusDays(base, 13)
  beforeAll(async () => {
    hand = await buildHandCase()
    forecast = await expectOk(coordinator.get(`/api/stockroom/forecast?from=${from()}&to=${to()}&courseId=${hand.courseId}`))
  })
  const perPair = (10 * M_DMB / 1000) / RHO_DMB // 1.301813 mL

  it('counts 6 pairs in A and 4 in B, and leaves out C’s skipped date', () => {
    expect(forecast.sessions.map((s) => [s.sectionCode, s.meetingDate, s.students, s.units])).toEqual([['A', base, 12, 6], ['B', plusDays(base, 9), 7, 4]])
    expect(forecast.skippedSessions).toEqual([expect.objectContaining({ sectionCode: 'C', meetingDate: plusDays(base, 3) })])
  })

  it('the alkane: required, the lot that expires between the meetings, the expired lot, 25 mL bottles', () => {
    const line = forecast.lines.find((l) => l.reagentId === hand.alkaneId)!
    // A: 6 × 1.301813 × 1.15 = 8.98251 mL; B: 4 × 1.301813 × 1.15 = 5.98834 mL; together 14.97085.
    expect(line.weeks).toEqual([{ week: base, required: 8.983 }, { week: plusDays(base, 7), required: 5.988 }])
    expect(line.required).toBeCloseTo(10 * perPair * 1.15, 3)
    // L1 (10 mL, out of date after base + 4) covers A; B gets L3's 3 mL; L2 expired yesterday.
    expect(line.onHand).toBeCloseTo(8.983 + 3, 3)
    expect(line.shortfall).toBeCloseTo(2.988, 3)
    expect(line.notCounted).toBeCloseTo(6 + (10 - 8.983), 3)
    expect([line.containers, line.containerSize, line.unit]).toEqual([1, 25, 'mL'])
  })

  it('the drying agent: 10 pairs × 1 g × 1.10 with nothing in stock is one 500 g container', () => {
    const line = forecast.lines.find((l) => l.reagentId === hand.dryingId)!
    expect(line).toMatchObject({ required: 11, onHand: 0, shortfall: 11, containers: 1, containerSize: 500, unit: 'g' })
  })

  it('halogenated waste: (1.302 mL substrate + the rinse allowance) per pair; the unlinked chlorine is reported', () => {
    const rinse = forecast.rinseMlPerUnit
    const expectedWaste = Math.round(6 * (perPair + rinse) * 10) / 10 + Math.round(4 * (perPair + rinse) * 10) / 10
    expect(forecast.halogenatedWasteMl).toBeCloseTo(expectedWaste, 6)
    expect(forecast.unlinkedItems).toEqual([expect.objectContaining({ name: 'chlorine', suggestedReagentName: 'chlorine' })])
  })

  it('an instructor sees only the forecast of their own courses', async () => {
    const owner = await signedIn(hand.owner.email, hand.owner.password)
    const own = await expectOk(owner.get(`/api/stockroom/forecast?from=${from()}&to=${to()}`))
    expect(own.lines.map((l) => l.reagentId).sort()).toEqual([hand.alkaneId, hand.dryingId].sort())
    const other = await signedIn(DEMO.instructor)
    expect((await other.get(`/api/stockroom/forecast?from=${from()}&to=${to()}&courseId=${hand.courseId}`)).status).toBe(404)
    const theirs = await expectOk(other.get(`/api/stockroom/forecast?from=${from()}&to=${to()}`))
    expect(theirs.lines.map((l) => l.reagentId)).not.toContain(hand.alkaneId)
  })

  // The route remembers answers by the text of what it read (server/services/stockroom/forecast.ts):
  // the same inputs give the same answer, and a write is seen by the next read.
  it('answers again from the stock as it is now: 1 mL taken from L3 leaves 1 mL more short', async () => {
    const again = () => expectOk(coordinator.get(`/api/stockroom/forecast?from=${from()}&to=${to()}&courseId=${hand.courseId}`))
    expect(await again()).toEqual(forecast)
    const l3 = await testDb().selectFrom('reagentLots').select('id').where('reagentId', '=', hand.alkaneId).where('lotCode', '=', 'L3')
      .executeTakeFirstOrThrow()
    await expectOk(coordinator.post(`/api/stockroom/lots/${l3.id}/usage`, { usedOn: today, amount: 1 }), 201)
    const after = (await again()).lines.find((l) => l.reagentId === hand.alkaneId)!
    expect(after.onHand).toBeCloseTo(8.983 + 2, 3)
    expect(after.shortfall).toBeCloseTo(3.988, 3)
  })

  it('refuses a bad range and names the field', async () => {
    const reply = await coordinator.get(`/api/stockroom/forecast?from=${to()}&to=${from()}`)
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage ?? reply.refusal.message).toMatch(/^to:/)
    expect((await coordinator.get('/api/stockroom/forecast?from=soon&to=2027-01-01')).status).toBe(400)
  })
})

describe('catalog and stock', () => {
  it('checks hazard statements, units and usage against what a lot holds', async () => {
    const bad = await coordinator.post('/api/stockroom/reagents', { name: `bad ${uid}`, physicalState: 'liquid', containerSize: 1, unit: 'mL', hazardCodes: ['H225', 'H999'] })
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^hazardCodes\.1:/)
    const gas = await coordinator.post('/api/stockroom/reagents', { name: `gas ${uid}`, physicalState: 'gas', containerSize: 450, unit: 'mL' })
    expect(gas.status).toBe(400)
    expect(gas.refusal.statusMessage).toMatch(/^unit:/)
    const reagent = await expectOk(coordinator.post('/api/stockroom/reagents', { name: `solvent ${uid}`, smiles: 'ClCCl', physicalState: 'liquid', density: 1.33, containerSize: 1000, unit: 'mL', shelfLifeMonths: 36 }), 201)
    expect(reagent.formula).toBe('CH2Cl2')
    expect((await coordinator.post('/api/stockroom/reagents', { name: `SOLVENT ${uid}`, physicalState: 'liquid', containerSize: 1, unit: 'mL' })).status).toBe(409)
    // 133 g of dichloromethane at 1.33 g/mL (CRC, from memory) is counted as 100 mL; shelf life sets the expiry.
    const lot = await expectOk(coordinator.post(`/api/stockroom/reagents/${reagent.id}/lots`, { quantity: 133, unit: 'g', receivedOn: '2026-01-31' }), 201)
    expect(lot).toMatchObject({ quantity: 100, unit: 'mL', remaining: 100, expiresOn: '2029-01-31', openedOn: null })
    const used = await expectOk(coordinator.post(`/api/stockroom/lots/${lot.id}/usage`, { usedOn: '2026-02-02', amount: 30, note: 'GC dilution' }), 201)
    expect(used).toMatchObject({ remaining: 70, openedOn: '2026-02-02' })
    const tooMuch = await coordinator.post(`/api/stockroom/lots/${lot.id}/usage`, { usedOn: '2026-02-03', amount: 70.5 })
    expect(tooMuch.status).toBe(422)
    expect(tooMuch.refusal.statusMessage).toMatch(/^amount: More than the lot holds \(70 mL left\)/)
    expect((await coordinator.request(`/api/stockroom/reagents/${reagent.id}`, { method: 'PATCH', json: { unit: 'g', physicalState: 'solid' } })).status).toBe(409)
    expect((await coordinator.request(`/api/stockroom/reagents/${reagent.id}`, { method: 'DELETE' })).status).toBe(409)
    const detail = await expectOk(coordinator.get(`/api/stockroom/reagents/${reagent.id}`))
    expect(detail.usage).toEqual([expect.objectContaining({ amount: 30, note: 'GC dilution', recordedBy: expect.any(String) })])
    const audit = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'reagent_lot').where('entityId', '=', String(lot.id)).execute()
    expect(audit.map((a) => a.action).sort()).toEqual(['lot.create', 'lot.use'])
  })
})

describe('order sheets', () => {
  const FORMULA = '=cmd|\' /C calc\'!A0'
  const supplier = `formula-${uid}@supplier.example`

  it('a draft from the shortfalls, a formula-named reagent neutralised in the CSV, one purchase e-mail, received into stock', async () => {
    const hand = await buildHandCase()
    const formula = await expectOk(coordinator.post('/api/stockroom/reagents', { name: FORMULA, physicalState: 'solid', containerSize: 100, unit: 'g', supplierName: 'Formula Supplies', supplierEmail: supplier, shelfLifeMonths: 12 }), 201)

    const draft = await expectOk(coordinator.post('/api/stockroom/orders', { from: base, to: plusDays(base, 13) }), 201)
    expect(draft.status).toBe('draft')
    const alkaneLine = draft.lines.find((l) => l.reagentId === hand.alkaneId)
    expect(alkaneLine).toMatchObject({ containers: 1, containerSize: 25, unit: 'mL', supplierEmail: expect.stringMatching(/^alkane-/) })
    // Keep this test's lines, add the formula-named reagent, change a count.
    const lines: Array<Record<string, unknown>> = draft.lines
      .filter((l) => l.reagentId === hand.alkaneId || l.reagentId === hand.dryingId).map(({ id, position, hazards, ...l }) => l)
    lines[0]!.containers = 2
    lines.push({ reagentId: formula.id, name: FORMULA, supplierName: 'Formula Supplies', supplierEmail: supplier, containers: 3, containerSize: 100, unit: 'g', note: '@SUM(1+1)' })
    const wrongUnit = await coordinator.request(`/api/stockroom/orders/${draft.id}`, { method: 'PATCH', json: { lines: [{ ...lines[2], unit: 'mL' }] } })
    expect(wrongUnit.status).toBe(400)
    expect(wrongUnit.refusal.statusMessage).toMatch(/^lines\.0\.unit:/)
    const edited = await expectOk(coordinator.request(`/api/stockroom/orders/${draft.id}`, { method: 'PATCH', json: { lines, notes: 'Please quote by Friday.' } }))
    expect(edited.lines).toHaveLength(3)

    const csv = await coordinator.get(`/stockroom/orders/${draft.id}/sheet.csv`)
    expect(csv.status).toBe(200)
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const text = csv.body as string
    // OWASP CSV injection guidance: a cell starting with = + - @ gets a leading apostrophe.
    expect(text).toContain(`"'${FORMULA.replace(/"/g, '""')}"`)
    expect(text).toContain('"\'@SUM(1+1)"')
    expect(text).not.toMatch(/(^|,)"?=cmd/m)

    const send = await expectOk(coordinator.post(`/api/stockroom/orders/${draft.id}/send`))
    expect(send.status).toBe('sent')
    expect(send.requests.map((r) => r.supplierEmail).sort()).toEqual([alkaneLine!.supplierEmail, supplier].sort())
    expect((await coordinator.post(`/api/stockroom/orders/${draft.id}/send`)).status).toBe(409)
    expect((await coordinator.request(`/api/stockroom/orders/${draft.id}`, { method: 'PATCH', json: { title: 'late change' } })).status).toBe(409)

    const [mail] = await eventually(async () => { const m = await mailTo(supplier); return m.length ? m : undefined })
    expect(mail!.subject).toBe(`Purchase request ${draft.id}: ${draft.title}`)
    expect(mail!.text).toContain(`${FORMULA}: 3 × 100 g`)
    expect(mail!.html).toContain('=cmd|&#39; /C calc&#39;!A0')
    const attachment = mail!.attachments.find((a) => a.filename === `purchase-request-${draft.id}.csv`)!
    expect(attachment.content.toString('utf8')).toContain(`"'${FORMULA}"`)
    expect(attachment.content.toString('utf8')).not.toContain('test alkane')
    // Once: the second send was refused, and the queue keys each request by order and supplier.
    await allSent(`order:${draft.id}:${supplier}`, 1)
    expect(await mailTo(supplier)).toHaveLength(1)
    const rows = await testDb().selectFrom('mailMessages').select('dedupeKey').where('dedupeKey', 'like', `order:${draft.id}:%`).execute()
    expect(rows.map((r) => r.dedupeKey).sort()).toEqual([`order:${draft.id}:${alkaneLine!.supplierEmail}`, `order:${draft.id}:${supplier}`].sort())

    const sent = await expectOk(coordinator.get(`/api/stockroom/orders/${draft.id}`))
    const byReagent = (id: number) => sent.lines.find((l) => l.reagentId === id)
    const receivedOn = today
    const received = await expectOk(coordinator.post(`/api/stockroom/orders/${draft.id}/receive`, {
      receivedOn,
      lines: [
        { lineId: byReagent(hand.alkaneId)!.id, containers: 2, lotCode: 'NEW-1', location: 'Cabinet F2', expiresOn: plusDays(today, 400) },
        { lineId: byReagent(formula.id)!.id, containers: 3, lotCode: 'NEW-2', location: 'Shelf S1' },
        { lineId: byReagent(hand.dryingId)!.id, containers: 0 },
      ],
    }))
    // The drying agent did not come: the order stays open until it does or the rest is closed.
    expect(received.status).toBe('sent')
    expect(received.lines.find((l) => l.reagentId === hand.dryingId)).toMatchObject({ received: 0, open: 1 })
    expect((await expectOk(coordinator.post(`/api/stockroom/orders/${draft.id}/close`, { reason: 'Drying agent back-ordered' }))).status).toBe('received')
    expect(received.lots.map((l) => [l.reagentId, l.quantity, l.unit]).sort()).toEqual([[formula.id, 300, 'g'], [hand.alkaneId, 50, 'mL']].sort())
    const formulaLot = await testDb().selectFrom('reagentLots').selectAll().where('reagentId', '=', formula.id).executeTakeFirstOrThrow()
    expect(formulaLot).toMatchObject({ containers: 3, lotCode: 'NEW-2', receivedOn })
    // Shelf life 12 months from the received date.
    expect(formulaLot.expiresOn!.slice(0, 4)).toBe(String(Number(receivedOn.slice(0, 4)) + 1))
    expect((await coordinator.post(`/api/stockroom/orders/${draft.id}/receive`, { receivedOn, lines: [{ lineId: byReagent(hand.dryingId)!.id, containers: 1 }] })).status).toBe(409)
    const audit = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'order_sheet').where('entityId', '=', String(draft.id)).execute()
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(['order.create', 'order.update', 'order.send', 'order.receive', 'order.close']))

    // The forecast now counts the new bottles: nothing short of the alkane in that range.
    const after = await expectOk(coordinator.get(`/api/stockroom/forecast?from=${base}&to=${plusDays(base, 13)}&courseId=${hand.courseId}`))
    expect(after.lines.find((l) => l.reagentId === hand.alkaneId)).toMatchObject({ shortfall: 0, containers: 0 })
  })

  it('a sheet cannot be sent while a line has no supplier e-mail, and an empty range makes no sheet', async () => {
    const empty = await expectOk(coordinator.post('/api/stockroom/orders', { title: `Waste containers ${uid}` }), 201)
    await expectOk(coordinator.request(`/api/stockroom/orders/${empty.id}`, { method: 'PATCH', json: { lines: [
      { name: 'Halogenated waste container, 4 L', supplierName: 'Somewhere', supplierEmail: `waste-${uid}@supplier.example`, containers: 2, containerSize: 1, unit: 'each' },
      { name: 'Spill pillows', containers: 1, containerSize: 10, unit: 'each' },
    ] } }))
    const refused = await coordinator.post(`/api/stockroom/orders/${empty.id}/send`)
    expect(refused.status).toBe(422)
    expect(refused.refusal.statusMessage).toMatch(/^lines\.1\.supplierEmail: Line 2 \(Spill pillows\)/)
    expect((await testDb().selectFrom('orderSheets').select('status').where('id', '=', empty.id).executeTakeFirstOrThrow()).status).toBe('draft')
    expect(await mailTo(`waste-${uid}@supplier.example`)).toHaveLength(0)
    const far = plusDays(today, 3000)
    expect((await coordinator.post('/api/stockroom/orders', { from: far, to: plusDays(far, 6) })).status).toBe(409)
    expect((await coordinator.request(`/api/stockroom/orders/${empty.id}`, { method: 'DELETE' })).status).toBe(204)
  })
})
