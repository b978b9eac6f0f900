import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { createUser, testDb } from '../support/db'
import { analyzeSubstrate, canonicalSmiles } from '../../shared/utils/halogenation'

const FIXTURES = join(import.meta.dirname, 'fixtures', 'standard-runs')
const fixture = (name: string) => readFileSync(join(FIXTURES, name))

// 1-chlorobutane's four dichlorobutanes, as openchemlib writes them.
const DICHLORO = {
  '1,1': canonicalSmiles('CCCC(Cl)Cl'),
  '1,2': canonicalSmiles('CCC(Cl)CCl'),
  '1,3': canonicalSmiles('CC(Cl)CCCl'),
  '1,4': canonicalSmiles('ClCCCCCl'),
}

async function freshInstructor() {
  const user = await createUser('instructor')
  return { user, client: await signedIn(user.email, user.password) }
}

function upload<Path extends string>(client: Client, path: Path, bytes: Buffer, name: string) {
  const form = new FormData()
  form.append('file', new Blob([new Uint8Array(bytes)], { type: 'text/csv' }), name)
  return client.request(path, { method: 'POST', body: form })
}

async function createSubstrate(client: Client, body: Record<string, unknown> = {}) {
  const reply = await client.post('/api/substrates', { name: '1-chlorobutane, column B', smiles: 'ClCCCC', density: 0.886, boilingPointC: 78.4, source: 'CRC Handbook, from memory', ...body })
  expect(reply.status, JSON.stringify(reply.body)).toBe(201)
  return reply.body
}

const seededId = async (table: 'substrates' | 'methods', where: [string, string]) => {
  const row = await testDb().selectFrom(table as 'substrates').select('id').where(where[0] as 'name', '=', where[1]).where('ownerId', 'is', null).executeTakeFirstOrThrow()
  return row.id
}

let instructor: Client
let instructorId: number
beforeAll(async () => {
  const fresh = await freshInstructor()
  instructor = fresh.client
  instructorId = fresh.user.id
})

describe('who may use the library', () => {
  it('an anonymous caller gets 401 and a student 403, on lists and entries', async () => {
    const id = await seededId('substrates', ['name', '1-chlorobutane'])
    const anonymous = new Client()
    expect((await anonymous.get('/api/substrates')).status).toBe(401)
    expect((await anonymous.post('/api/substrates/preview', { smiles: 'CCC' })).status).toBe(401)
    const student = await signedIn(DEMO.student(3))
    for (const path of ['/api/substrates', '/api/methods', `/api/substrates/${id}`]) {
      expect((await student.get(path)).status, path).toBe(403)
    }
    expect((await student.post('/api/substrates', { name: 'x', smiles: 'CCC' })).status).toBe(403)
  })

  it('a TA reads substrates with their windows but cannot write', async () => {
    const ta = await signedIn(DEMO.ta1)
    const list = await ta.get('/api/substrates')
    expect(list.status).toBe(200)
    const chlorobutane = list.body.find((s) => s.name === '1-chlorobutane')
    expect(chlorobutane).toMatchObject({ shared: true, mine: false })
    const detail = await ta.get(`/api/substrates/${chlorobutane!.id}`)
    expect(detail.status).toBe(200)
    expect(detail.body.windows.length).toBeGreaterThan(0)
    expect((await ta.post('/api/substrates', { name: 'x', smiles: 'CCC' })).status).toBe(403)
    expect((await ta.post('/api/substrates/preview', { smiles: 'CCC' })).status).toBe(403)
    expect((await ta.request(`/api/substrates/${chlorobutane!.id}`, { method: 'PATCH', json: { name: 'x' } })).status).toBe(403)
    expect((await ta.request(`/api/substrates/${chlorobutane!.id}/windows`, { method: 'PUT', json: { windows: [] } })).status).toBe(403)
    expect((await ta.post('/api/methods', { name: 'x' })).status).toBe(403)
    expect((await ta.get('/api/methods')).status).toBe(200)
  })

  it('the coordinator reads molar masses and densities for the stockroom', async () => {
    const coordinator = await signedIn(DEMO.coordinator)
    const reply = await coordinator.get('/api/substrates')
    expect(reply.status).toBe(200)
    const dmb = reply.body.find((s) => s.name === '2,3-dimethylbutane')
    // Molar mass from IUPAC standard atomic weights, density CRC Handbook from memory (PRODUCT.md).
    expect(dmb!.molarMass).toBeCloseTo(86.18, 2)
    expect(dmb!.density).toBeCloseTo(0.662, 3)
    expect((await coordinator.post(`/api/substrates/${dmb!.id}/copy`)).status).toBe(403)
  })

  it('another instructor’s own entries are not listed and answer 404', async () => {
    const mine = await createSubstrate(instructor, { name: 'private draft' })
    const other = (await freshInstructor()).client
    expect((await other.get(`/api/substrates/${mine.id}`)).status).toBe(404)
    expect((await other.get('/api/substrates')).body.some((s) => s.id === mine.id)).toBe(false)
    expect((await other.request(`/api/substrates/${mine.id}`, { method: 'PATCH', json: { name: 'mine now' } })).status).toBe(404)
  })
})

describe('the seeded library', () => {
  it('has the four methods, each with its source', async () => {
    const reply = await instructor.get('/api/methods')
    const shared = reply.body.filter((m) => m.shared)
    expect(shared.map((m) => m.reagent).sort()).toEqual(['br2-light', 'cl2-light', 'nbs', 'so2cl2-azo'])
    for (const m of shared) expect(m.source.length, m.name).toBeGreaterThan(10)
    const chlorine = shared.find((m) => m.reagent === 'cl2-light')
    // 1 : 3.8 : 5.0 per H at 25 °C (NCERT Chemistry class XI worked example).
    expect(chlorine).toMatchObject({ halogen: 'Cl', temperatureC: 25, reactivity: { primary: 1, secondary: 3.8, tertiary: 5 } })
    expect(shared.find((m) => m.reagent === 'nbs')!.halogen).toBe('Br')
  })

  it.each([
    ['1-chlorobutane', 4, [DICHLORO['1,1'], DICHLORO['1,2'], DICHLORO['1,3'], DICHLORO['1,4']]],
    ['2,3-dimethylbutane', 2, [canonicalSmiles('CC(C)C(C)(C)Cl'), canonicalSmiles('CC(C)C(C)CCl')]],
  ])('%s has a window for every product, solvent and starting material, none overlapping', async (name, productCount, elutionOrder) => {
    const list = await instructor.get('/api/substrates')
    const entry = list.body.find((s) => s.name === name && s.shared)
    const detail = (await instructor.get(`/api/substrates/${entry!.id}`)).body
    expect(detail.products).toHaveLength(productCount)
    const windows = [...detail.windows].sort((a, b) => a.rtMin - b.rtMin)
    expect(windows.map((w) => w.kind)).toEqual(['solvent', 'starting-material', ...Array(productCount).fill('product')])
    expect(windows.slice(2).map((w) => w.productSmiles)).toEqual(elutionOrder)
    for (let i = 1; i < windows.length; i++) expect(windows[i]!.rtMin, `${windows[i - 1]!.label} / ${windows[i]!.label}`).toBeGreaterThanOrEqual(windows[i - 1]!.rtMax)
    for (const w of windows) expect(w.responseFactor).toBe(1)
    expect(windows[0]).toMatchObject({ label: 'dichloromethane', rtMin: 1.2, rtMax: 1.6 })
  })

  it('is read-only: edits answer 403, a copy is the instructor’s own to edit', async () => {
    const id = await seededId('substrates', ['name', '2,3-dimethylbutane'])
    expect((await instructor.request(`/api/substrates/${id}`, { method: 'PATCH', json: { notes: 'mine' } })).status).toBe(403)
    expect((await instructor.request(`/api/substrates/${id}/windows`, { method: 'PUT', json: { windows: [] } })).status).toBe(403)
    expect((await instructor.request(`/api/substrates/${id}`, { method: 'DELETE' })).status).toBe(403)
    expect((await upload(instructor, `/api/substrates/${id}/standard-runs`, fixture('1-chlorobutane-standard.csv'), 'run.csv')).status).toBe(403)
    const copy = await instructor.post(`/api/substrates/${id}/copy`)
    expect(copy.status).toBe(201)
    expect(copy.body).toMatchObject({ name: '2,3-dimethylbutane (copy)', shared: false, mine: true })
    expect(copy.body.windows).toHaveLength(4)
    const edited = await instructor.request(`/api/substrates/${copy.body.id}`, { method: 'PATCH', json: { notes: 'our column' } })
    expect(edited.status).toBe(200)
    expect(edited.body.notes).toBe('our column')

    const methodId = await seededId('methods', ['reagent', 'cl2-light'])
    expect((await instructor.request(`/api/methods/${methodId}`, { method: 'PATCH', json: { temperatureC: 30 } })).status).toBe(403)
    const methodCopy = await instructor.post(`/api/methods/${methodId}/copy`)
    expect(methodCopy.status).toBe(201)
    expect(methodCopy.body).toMatchObject({ mine: true, shared: false, reagent: 'cl2-light' })
    expect((await instructor.request(`/api/methods/${methodCopy.body.id}`, { method: 'PATCH', json: { temperatureC: 30 } })).body.temperatureC).toBe(30)
  })
})

describe('substrates from SMILES', () => {
  it('previews products and H counts without storing anything', async () => {
    const before = await testDb().selectFrom('substrates').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
    const reply = await instructor.post('/api/substrates/preview', { smiles: 'CC(C)C(C)C' })
    expect(reply.status).toBe(200)
    // 2,3-dimethylbutane: 12 primary H and 2 tertiary H (count from the structure).
    expect(reply.body.products.map((p) => [p.label, p.hydrogens, p.carbonClass])).toEqual([['a', 12, 'primary'], ['b', 2, 'tertiary']])
    expect(reply.body.depictionSvg).toMatch(/^<svg/)
    const after = await testDb().selectFrom('substrates').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
    expect(after.n).toBe(before.n)
  })

  it('creates one with canonical SMILES, formula and molar mass computed on the server', async () => {
    const created = await createSubstrate(instructor)
    expect(created.smiles).toBe('CCCCCl')
    expect(created.formula).toBe('C4H9Cl')
    // IUPAC standard atomic weights (PRODUCT.md): 1-chlorobutane 92.57 g/mol.
    expect(created.molarMass).toBeCloseTo(92.57, 2)
    expect(created.products.map((p) => p.hydrogens).sort()).toEqual([2, 2, 2, 3])
    expect(new Set(created.products.map((p) => p.smiles))).toEqual(new Set(Object.values(DICHLORO)))
    const row = await testDb().selectFrom('substrates').selectAll().where('id', '=', created.id).executeTakeFirstOrThrow()
    expect(row).toMatchObject({ smiles: 'CCCCCl', ownerId: instructorId, formula: 'C4H9Cl' })
    const audited = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'substrate').where('entityId', '=', String(created.id)).execute()
    expect(audited.map((a) => a.action)).toContain('substrate.create')
  })

  it.each(['C(C', 'CCN', 'CC.CC'])('refuses %s with a 400 carrying the engine’s own sentence', async (smiles) => {
    let engineMessage = ''
    try { analyzeSubstrate(smiles) } catch (error) { engineMessage = (error as Error).message }
    expect(engineMessage).not.toBe('')
    for (const path of ['/api/substrates/preview', '/api/substrates']) {
      const reply = await instructor.post(path, { name: 'bad', smiles })
      expect(reply.status, path).toBe(400)
      expect(reply.refusal.statusMessage, path).toBe(engineMessage)
    }
  })

  it('wants a source for physical data and names the field', async () => {
    const reply = await instructor.post('/api/substrates', { name: 'hexane', smiles: 'CCCCCC', density: 0.659 })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^source:/)
  })
})

describe('retention-time windows', () => {
  let substrate: Awaited<ReturnType<typeof createSubstrate>>
  beforeAll(async () => { substrate = await createSubstrate(instructor) })
  const put = (windows: unknown[]) => instructor.request(`/api/substrates/${substrate.id}/windows`, { method: 'PUT', json: { windows } })

  it('stores product SMILES written any way as the canonical products, with their letters', async () => {
    const reply = await put([
      { kind: 'solvent', label: 'dichloromethane', rtMin: 1.2, rtMax: 1.6 },
      { kind: 'starting-material', rtMin: 2.1, rtMax: 2.4 },
      { kind: 'product', productSmiles: 'ClC(Cl)CCC', rtMin: 3.3, rtMax: 3.5 },
      { kind: 'product', productSmiles: 'C(Cl)C(Cl)CC', rtMin: 3.8, rtMax: 4.0, responseFactor: 1.05 },
      { kind: 'product', productSmiles: 'ClCCC(Cl)C', rtMin: 4.4, rtMax: 4.6 },
      { kind: 'product', productSmiles: 'C(CCl)CCCl', rtMin: 5.6, rtMax: 5.8 },
    ])
    expect(reply.status, JSON.stringify(reply.body)).toBe(200)
    const stored = await testDb().selectFrom('substrateWindows').selectAll().where('substrateId', '=', substrate.id).orderBy('rtMin').execute()
    expect(stored.map((w) => w.productSmiles)).toEqual([null, null, DICHLORO['1,1'], DICHLORO['1,2'], DICHLORO['1,3'], DICHLORO['1,4']])
    expect(stored[3]!.responseFactor).toBeCloseTo(1.05, 6)
    const detail = (await instructor.get(`/api/substrates/${substrate.id}`)).body
    const letters = Object.fromEntries(detail.products.map((p) => [p.smiles, p.label]))
    for (const w of detail.windows.filter((x) => x.kind === 'product')) expect(w.position).toBe(letters[w.productSmiles!])
  })

  it('refuses a product the substrate does not give, naming it', async () => {
    const reply = await put([{ kind: 'product', productSmiles: 'CCCCBr', rtMin: 3, rtMax: 3.2 }])
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toContain('windows.0.productSmiles')
    expect(reply.refusal.statusMessage).toContain('CCCCBr')
  })

  it('takes bromination products too, apart from the chlorination windows', async () => {
    const bromo = substrate.products[0]!.brominated
    const reply = await put([
      { kind: 'product', productSmiles: substrate.products[0]!.smiles, rtMin: 3.3, rtMax: 3.5 },
      { kind: 'product', productSmiles: bromo, rtMin: 3.4, rtMax: 3.6 },
    ])
    expect(reply.status, JSON.stringify(reply.body)).toBe(200)
    expect(reply.body.windows.map((w) => w.halogen).sort()).toEqual(['Br', 'Cl'])
  })

  it('refuses overlapping windows naming both, and keeps what was saved', async () => {
    await put([{ kind: 'solvent', rtMin: 1.2, rtMax: 1.6 }])
    const reply = await put([
      { kind: 'solvent', rtMin: 1.2, rtMax: 1.6 },
      { kind: 'product', productSmiles: 'ClCCCCCl', rtMin: 3.9, rtMax: 4.2 },
      { kind: 'product', productSmiles: 'CCC(Cl)CCl', rtMin: 4.1, rtMax: 4.3 },
    ])
    expect(reply.status).toBe(400)
    const [one, two] = ['ClCCCCCl', 'CCC(Cl)CCl'].map((s) => substrate.products.find((p) => p.smiles === canonicalSmiles(s)))
    expect(reply.refusal.statusMessage).toContain(`${one!.label} (${one!.smiles})`)
    expect(reply.refusal.statusMessage).toContain(`${two!.label} (${two!.smiles})`)
    expect(reply.refusal.data?.issues?.map((i) => i.field).sort()).toEqual(['windows.1', 'windows.2'])
    const stored = await testDb().selectFrom('substrateWindows').select('kind').where('substrateId', '=', substrate.id).execute()
    expect(stored.map((w) => w.kind)).toEqual(['solvent'])
  })

  it('refuses a window that ends before it starts, naming the row', async () => {
    const reply = await put([{ kind: 'solvent', rtMin: 1.6, rtMax: 1.2 }])
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^windows\.0\.rtMax:/)
  })
})

describe('standard runs', () => {
  it('keeps the file and suggests a window around each peak', async () => {
    const substrate = await createSubstrate(instructor)
    const bytes = fixture('1-chlorobutane-standard.csv')
    const reply = await upload(instructor, `/api/substrates/${substrate.id}/standard-runs`, bytes, '1-chlorobutane-standard.csv')
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    expect(reply.body.peaks).toHaveLength(6)
    const windows = reply.body.suggestions.map((s) => [s.rt, s.suggestedWindow.rtMin, s.suggestedWindow.rtMax])
    // ± 0.08 min (common practice), or half the distance to the next peak: 3.902 and 4.012 are 0.110 apart.
    expect(windows[0]).toEqual([1.405, 1.325, 1.485])
    expect(windows[3]).toEqual([3.902, 3.847, 3.957])
    expect(windows[4]).toEqual([4.012, 3.957, 4.067])
    const sha256 = createHash('sha256').update(bytes).digest('hex')
    expect(reply.body.sha256).toBe(sha256)
    const run = await testDb().selectFrom('standardRuns').innerJoin('files', 'files.id', 'standardRuns.fileId')
      .select(['files.sha256', 'files.byteSize', 'files.content', 'files.originalName', 'standardRuns.substrateId'])
      .where('standardRuns.id', '=', reply.body.id).executeTakeFirstOrThrow()
    expect(run).toMatchObject({ sha256, byteSize: bytes.length, originalName: '1-chlorobutane-standard.csv', substrateId: substrate.id })
    expect(Buffer.compare(run.content, bytes)).toBe(0)
    const detail = (await instructor.get(`/api/substrates/${substrate.id}`)).body
    expect(detail.standardRuns.map((r) => r.sha256)).toEqual([sha256])
  })

  it('says which saved window holds a peak already', async () => {
    const substrate = await createSubstrate(instructor)
    await instructor.request(`/api/substrates/${substrate.id}/windows`, { method: 'PUT', json: { windows: [{ kind: 'solvent', rtMin: 1.3, rtMax: 1.5 }] } })
    const reply = await upload(instructor, `/api/substrates/${substrate.id}/standard-runs`, fixture('1-chlorobutane-standard.csv'), 'again.csv')
    expect(reply.body.suggestions[0]!.current).toEqual({ kind: 'solvent', productSmiles: null })
    expect(reply.body.suggestions[1]!.current).toBeNull()
  })

  it('refuses a table without areas with the parser’s row message and stores nothing', async () => {
    const substrate = await createSubstrate(instructor)
    const reply = await upload(instructor, `/api/substrates/${substrate.id}/standard-runs`, fixture('no-area-column.csv'), 'heights.csv')
    expect(reply.status).toBe(422)
    expect(reply.refusal.statusMessage).toMatch(/^file: Row 1: the header has no area column/)
    const runs = await testDb().selectFrom('standardRuns').select('id').where('substrateId', '=', substrate.id).execute()
    expect(runs).toEqual([])
  })
})

describe('methods', () => {
  const body = { name: 'Chlorine and light, our lamp', reagent: 'cl2-light', temperatureC: 20, reactivity: { primary: 1, secondary: 3.9, tertiary: 5.1 }, source: 'our standard runs, spring term', notes: '' }

  it('need a source', async () => {
    const reply = await instructor.post('/api/methods', { ...body, source: '  ' })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^source:/)
  })

  it('refuse a halogen the reagent does not give', async () => {
    const reply = await instructor.post('/api/methods', { ...body, reagent: 'nbs', halogen: 'Cl' })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toMatch(/^halogen:/)
  })

  it('are created, read, changed and deleted, each change audited', async () => {
    const created = await instructor.post('/api/methods', body)
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ halogen: 'Cl', mine: true, shared: false, source: body.source })
    const id = created.body.id
    expect((await instructor.get(`/api/methods/${id}`)).body.reactivity).toEqual(body.reactivity)
    const changed = await instructor.request(`/api/methods/${id}`, { method: 'PATCH', json: { reagent: 'so2cl2-azo', temperatureC: 80 } })
    expect(changed.status).toBe(200)
    expect(changed.body).toMatchObject({ reagent: 'so2cl2-azo', halogen: 'Cl', temperatureC: 80, name: body.name })
    const toBromine = await instructor.request(`/api/methods/${id}`, { method: 'PATCH', json: { reagent: 'br2-light' } })
    expect(toBromine.body.halogen).toBe('Br')
    expect((await instructor.request(`/api/methods/${id}`, { method: 'DELETE' })).status).toBe(204)
    expect((await instructor.get(`/api/methods/${id}`)).status).toBe(404)
    const actions = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'method').where('entityId', '=', String(id)).orderBy('id').execute()
    expect(actions.map((a) => a.action)).toEqual(['method.create', 'method.update', 'method.update', 'method.delete'])
  })
})

describe('deleting what a practical uses', () => {
  it('answers 409 while a practical uses the substrate or method, and deletes once it is gone', async () => {
    const substrate = await createSubstrate(instructor)
    const method = (await instructor.post('/api/methods', { name: 'SO2Cl2 at reflux', reagent: 'so2cl2-azo', temperatureC: 80, reactivity: { primary: 1, secondary: 3.1, tertiary: 3.9 }, source: 'derived, common practice' })).body
    const db = testDb()
    const course = await db.insertInto('courses').values({ code: `LIB-${substrate.id}`, title: 'Library test', term: 'Test term', rubric: '[]' }).returning('id').executeTakeFirstOrThrow()
    await db.insertInto('courseOwners').values({ courseId: course.id, userId: instructorId }).execute()
    const practical = await db.insertInto('practicals').values({ courseId: course.id, title: 'Uses it', substrateId: substrate.id, methodId: method.id })
      .returning('id').executeTakeFirstOrThrow()

    const refused = await instructor.request(`/api/substrates/${substrate.id}`, { method: 'DELETE' })
    expect(refused.status).toBe(409)
    expect(refused.refusal.statusMessage).toMatch(/used by 1 practical/)
    expect((await instructor.request(`/api/methods/${method.id}`, { method: 'DELETE' })).status).toBe(409)
    expect((await instructor.get('/api/substrates')).body.find((s) => s.id === substrate.id)!.usedBy).toBe(1)
    // A new structure would orphan the practical's results.
    expect((await instructor.request(`/api/substrates/${substrate.id}`, { method: 'PATCH', json: { smiles: 'CCCCBr' } })).status).toBe(409)

    await db.deleteFrom('practicals').where('id', '=', practical.id).execute()
    await db.deleteFrom('courses').where('id', '=', course.id).execute()
    expect((await instructor.request(`/api/substrates/${substrate.id}`, { method: 'DELETE' })).status).toBe(204)
    expect((await instructor.request(`/api/methods/${method.id}`, { method: 'DELETE' })).status).toBe(204)
  })
})
