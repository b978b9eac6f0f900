import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { gcTable, makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import { makeNamedCourse, insertRichResult } from '../support/results'
import { canonicalSmiles } from '../../shared/utils/halogenation'

// Reference distributions and product names, through the real server. Check values: the
// shared 1-chlorobutane carries the seeded sulfuryl chloride reference 6 / 23 / 46 / 25 % (Brown
// and Ash, J. Am. Chem. Soc. 1955, from memory); the class model with the method's 1 : 3.09 per H
// gives 11.5 / 35.6 / 35.6 / 17.3 % (n·r per class, PRODUCT.md), 18.1 points away from it.
const D = {
  '1,1': canonicalSmiles('ClC(Cl)CCC'),
  '1,2': canonicalSmiles('ClCC(Cl)CC'),
  '1,3': canonicalSmiles('ClCCC(Cl)C'),
  '1,4': canonicalSmiles('ClCCCCCl'),
}
const REFERENCE = { [D['1,1']]: 6, [D['1,2']]: 23, [D['1,3']]: 46, [D['1,4']]: 25 }
const body = (percents: Record<string, number>, over: Record<string, unknown> = {}) => ({
  percents: Object.entries(percents).map(([productSmiles, percent]) => ({ productSmiles, percent })),
  source: 'Our own standard mixtures, autumn term', sourceKind: 'other', ...over,
})
const put = (client: Client, id: number, reagent: string, json: unknown) => client.request(`/api/substrates/${id}/references/${reagent}`, { method: 'PUT', json })
const del = (client: Client, id: number, reagent: string) => client.request(`/api/substrates/${id}/references/${reagent}`, { method: 'DELETE' })

let sharedId: number
let owner: Client
let copyId: number
let gc: GcPractical

beforeAll(async () => {
  sharedId = (await testDb().selectFrom('substrates').select('id').where('name', '=', '1-chlorobutane').where('ownerId', 'is', null).executeTakeFirstOrThrow()).id
  const user = await createUser('instructor')
  owner = await signedIn(user.email, user.password)
  const copy = await owner.post(`/api/substrates/${sharedId}/copy`)
  expect(copy.status).toBe(201)
  copyId = copy.body.id
  gc = await makeGcPractical({ substrate: '1-chlorobutane', reagent: 'so2cl2-azo', students: 4 })
})
afterAll(async () => {
  await gc?.cleanup()
  await closeTestDb()
})

describe('the shared library', () => {
  it('carries the seeded sulfuryl chloride reference for 1-chlorobutane, with its source, and names every product', async () => {
    const detail = await (await signedIn(DEMO.ta1)).get(`/api/substrates/${sharedId}`)
    expect(detail.status).toBe(200)
    expect(detail.body.references).toHaveLength(1)
    const ref = detail.body.references[0]
    expect(ref).toMatchObject({ reagent: 'so2cl2-azo', halogen: 'Cl', sourceKind: 'from-memory' })
    // The kind keeps that it was recalled; the line a reader sees is a reference, not our note.
    expect(ref!.source).toMatch(/J\. Am\. Chem\. Soc\. 77 \(1955\)/)
    expect(ref!.source).not.toMatch(/from memory/)
    expect(Object.fromEntries(ref!.percents.map((p) => [p.smiles, p.percent]))).toEqual(REFERENCE)
    const names = Object.fromEntries(detail.body.products.map((p) => [p.smiles, p.name]))
    expect(names).toEqual({ [D['1,1']]: '1,1-dichlorobutane', [D['1,2']]: '1,2-dichlorobutane', [D['1,3']]: '1,3-dichlorobutane', [D['1,4']]: '1,4-dichlorobutane' })
    expect(detail.body.products.map((p) => p.brominatedName).sort()).toEqual(['1-bromo-1-chlorobutane', '1-bromo-4-chlorobutane', '2-bromo-1-chlorobutane', '3-bromo-1-chlorobutane'])
  })

  it('is read-only: an instructor gets 403 on the shared entry and must copy it; the copy brings the reference and the names', async () => {
    const refused = await put(owner, sharedId, 'so2cl2-azo', body(REFERENCE))
    expect(refused.status).toBe(403)
    expect(refused.refusal.statusMessage).toMatch(/read-only/)
    const copy = await owner.get(`/api/substrates/${copyId}`)
    expect(copy.body.references.map((r) => r.reagent)).toEqual(['so2cl2-azo'])
    expect(copy.body.products.every((p) => p.name)).toBe(true)
  })
})

describe('PUT and DELETE /api/substrates/:id/references/:reagent', () => {
  it('lets the owner set one per reagent, replace it and remove it, each audited', async () => {
    const set = await put(owner, copyId, 'cl2-light', body({ 'ClC(Cl)CCC': 5, 'ClCC(Cl)CC': 22, 'ClCCC(Cl)C': 45, 'ClCCCCCl': 27.5 }))
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    const light = set.body.references.find((r) => r.reagent === 'cl2-light')
    // Any SMILES spelling comes back canonical.
    expect(light!.percents.find((p) => p.smiles === D['1,4'])!.percent).toBe(27.5)
    const replaced = await put(owner, copyId, 'cl2-light', body(REFERENCE, { sourceKind: 'published', source: 'A paper' }))
    expect(replaced.body.references.find((r) => r.reagent === 'cl2-light')).toMatchObject({ source: 'A paper', sourceKind: 'published' })
    expect((await del(owner, copyId, 'cl2-light')).status).toBe(204)
    expect((await del(owner, copyId, 'cl2-light')).status).toBe(404)
    const audits = await testDb().selectFrom('auditLog').select('action').where('entity', '=', 'substrate').where('entityId', '=', String(copyId)).execute()
    expect(audits.map((a) => a.action)).toEqual(expect.arrayContaining(['substrate.reference', 'substrate.reference.delete']))
  })

  it('refuses what is not a complete distribution of this substrate\'s products, naming the field', async () => {
    const short = await put(owner, copyId, 'cl2-light', body({ ...REFERENCE, [D['1,3']]: 36 }))
    expect(short.status).toBe(400)
    expect(short.refusal.data?.issues?.[0]).toMatchObject({ field: 'percents', message: expect.stringMatching(/add up to 90\.0 %/) })
    const stranger = await put(owner, copyId, 'cl2-light', body({ [D['1,1']]: 6, [D['1,2']]: 23, [D['1,3']]: 46, CCCCCCl: 25 }))
    expect(stranger.status).toBe(400)
    expect(stranger.refusal.data?.issues?.[0]?.field).toBe('percents.3.productSmiles')
    const missing = await put(owner, copyId, 'cl2-light', body({ [D['1,1']]: 6, [D['1,2']]: 23, [D['1,3']]: 71 }))
    expect(missing.status).toBe(400)
    expect(missing.refusal.data?.issues?.[0]?.message).toMatch(/missing/)
    // A bromination reference names the bromochlorobutanes, not the dichlorides.
    expect((await put(owner, copyId, 'br2-light', body(REFERENCE))).status).toBe(400)
    expect((await put(owner, copyId, 'iodine', body(REFERENCE))).status).toBe(400)
    expect((await put(owner, copyId, 'cl2-light', { ...body(REFERENCE), source: '' })).status).toBe(400)
  })

  it('refuses everyone but the entry\'s owner: another instructor, a TA, a student, nobody signed in', async () => {
    const other = await createUser('instructor')
    const otherClient = await signedIn(other.email, other.password)
    expect((await put(otherClient, copyId, 'cl2-light', body(REFERENCE))).status).toBe(404)
    expect((await del(otherClient, copyId, 'so2cl2-azo')).status).toBe(404)
    for (const client of [await signedIn(DEMO.ta1), await signedIn(DEMO.student(5))]) {
      expect((await put(client, copyId, 'cl2-light', body(REFERENCE))).status).toBe(403)
      expect((await del(client, sharedId, 'so2cl2-azo')).status).toBe(403)
    }
    expect((await put(new Client(), copyId, 'cl2-light', body(REFERENCE))).status).toBe(401)
    const still = await owner.get(`/api/substrates/${copyId}`)
    expect(still.body.references.map((r) => r.reagent)).toEqual(['so2cl2-azo'])
  })
})

describe('filling a reference from the course\'s own accepted results', () => {
  it('offers the instructor\'s practicals with this structure, with the mean of each unit\'s latest accepted, not excluded, result', async () => {
    const world = await makeNamedCourse({ sections: 1, studentsPerSection: 4 })
    const mole = (xs: number[]) => [D['1,1'], D['1,2'], D['1,3'], D['1,4']].map((smiles, i) => ({ smiles, percent: xs[i]! }))
    const [a, b, c, d] = world.students
    await insertRichResult(world.practicalId, a!, { secondary: 2.8, molePercents: mole([6, 24, 46, 24]) })
    await insertRichResult(world.practicalId, b!, { secondary: 2.7, molePercents: mole([8, 22, 44, 26]) })
    await insertRichResult(world.practicalId, c!, { secondary: 9, molePercents: mole([1, 9, 85, 5]), excluded: 'Solvent counted' })
    await insertRichResult(world.practicalId, d!, { secondary: 3, molePercents: mole([10, 30, 30, 30]), status: 'pending' })
    const instructor = await signedIn(world.owner.email, world.owner.password)
    // The fixture course runs the shared entry; a copy has the same structure, so it offers the same practical.
    const instructorCopy = (await instructor.post(`/api/substrates/${sharedId}/copy`)).body.id
    for (const id of [sharedId, instructorCopy]) {
      const reply = await instructor.get(`/api/substrates/${id}/reference-candidates`)
      expect(reply.status).toBe(200)
      const mine = reply.body.find((x) => x.practicalId === world.practicalId)
      expect(mine).toMatchObject({ reagent: 'so2cl2-azo', n: 2 })
      // Mean of (6, 24, 46, 24) and (8, 22, 44, 26); the excluded and the pending runs do not count.
      expect(Object.fromEntries(mine!.percents.map((p) => [p.smiles, p.percent]))).toEqual({ [D['1,1']]: 7, [D['1,2']]: 23, [D['1,3']]: 45, [D['1,4']]: 25 })
      expect(mine!.source).toMatch(/^Mean of 2 accepted results, /)
    }
    const strangerUser = await createUser('instructor')
    const stranger = await (await signedIn(strangerUser.email, strangerUser.password)).get(`/api/substrates/${sharedId}/reference-candidates`)
    expect(stranger.status).toBe(200)
    expect(stranger.body.some((x) => x.practicalId === world.practicalId)).toBe(false)
    expect((await (await signedIn(DEMO.ta1)).get(`/api/substrates/${sharedId}/reference-candidates`)).status).toBe(403)
  })
})

describe('product names in the window editor', () => {
  it('stores the owner\'s names with the windows, falls back to the built-in name when cleared, and refuses a stranger\'s product', async () => {
    const detail = (await owner.get(`/api/substrates/${copyId}`)).body
    const windows = detail.windows.map((w) => ({ kind: w.kind, productSmiles: w.productSmiles ?? undefined, label: w.kind === 'solvent' ? w.label : undefined, rtMin: w.rtMin, rtMax: w.rtMax, responseFactor: w.responseFactor }))
    const saved = await owner.request(`/api/substrates/${copyId}/windows`, { method: 'PUT', json: { windows, names: [{ productSmiles: 'ClCCC(Cl)C', name: '1,3-DCB' }, { productSmiles: D['1,1'], name: '' }] } })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    const after = (await owner.get(`/api/substrates/${copyId}`)).body
    expect(after.products.find((p) => p.smiles === D['1,3'])!.name).toBe('1,3-DCB')
    expect(after.products.find((p) => p.smiles === D['1,1'])!.name).toBe('1,1-dichlorobutane')
    expect(after.windows).toHaveLength(detail.windows.length)
    const bad = await owner.request(`/api/substrates/${copyId}/windows`, { method: 'PUT', json: { windows, names: [{ productSmiles: 'CCCCCCCl', name: 'x' }] } })
    expect(bad.status).toBe(400)
    expect(bad.refusal.data?.issues?.[0]?.field).toBe('names.0.productSmiles')
    const ta = await signedIn(DEMO.ta1)
    expect((await ta.request(`/api/substrates/${sharedId}/windows`, { method: 'PUT', json: { windows: [], names: [] } })).status).toBe(403)
    expect((await owner.request(`/api/substrates/${sharedId}/windows`, { method: 'PUT', json: { windows: [], names: [] } })).status).toBe(403)
  })
})

describe('a 1-chlorobutane upload with sulfuryl chloride', () => {
  const percentsOf = (mixture: Record<string, number>) => Object.entries(mixture).map(([smiles, percent]) => ({ smiles, percent }))

  it('is judged against the reference distribution: the class model\'s own mixture is flagged, naming products', async () => {
    const student = await gc.signIn(gc.students[0]!)
    const reply = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 31, distribution: gc.truth }).text)
    expect(reply.status, JSON.stringify(reply.body)).toBe(201)
    const far = reply.body.flags.find((f) => f.code === 'far-from-prediction')
    expect(far).toBeDefined()
    expect(far!.severity).toBe('warning')
    expect(far!.message).toMatch(/percentage points away from the reference distribution from H\. C\. Brown and A\. B\. Ash/)
    expect(far!.message).toMatch(/largest gap is 1,[1-4]-dichlorobutane \(/)
  })

  it('passes a mixture near the reference, and the student reads what it is compared with', async () => {
    const student = await gc.signIn(gc.students[2]!)
    const reply = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 32, distribution: percentsOf(REFERENCE) }).text)
    expect(reply.status).toBe(201)
    expect(reply.body.flags.filter((f) => f.severity !== 'info')).toEqual([])
    const mine = (await student.get(`/api/practicals/${gc.practicalId}/my-submissions`)).body
    expect(mine.chemistry.expected.basis).toBe('reference')
    expect(mine.chemistry.expected.description).toMatch(/^the reference distribution from /)
    expect(mine.chemistry.productKind).toBe('dichlorides')
    expect(mine.chemistry.products.map((p) => p.name).sort()).toEqual(['1,1-dichlorobutane', '1,2-dichlorobutane', '1,3-dichlorobutane', '1,4-dichlorobutane'])
  })

  it('names the product in its flags: a missing product, and a drifted peak counted for its window', async () => {
    const student = await gc.signIn(gc.students[2]!)
    const missing = await uploadGc(student, gc.practicalId, gcTable(gc, { seed: 33, distribution: percentsOf(REFERENCE), fault: 'missing-product', faultProduct: 0 }).text, { preview: true })
    const flag = missing.body.flags.find((f) => f.code === 'missing-product')
    expect(flag!.message).toMatch(/^No peak was found for 1,[1-4]-dichlorobutane \(C/)
    // Every product peak of the run 0.06 min after its window's end: counted, flagged as drift, no product missing.
    const sim = gcTable(gc, { seed: 34, distribution: percentsOf(REFERENCE), rtJitter: 0 })
    const late = sim.peaks.map((p) => {
      const w = gc.windows.find((x) => p.retentionTime >= x.rtMin && p.retentionTime <= x.rtMax)
      return w ? { ...p, retentionTime: w.rtMax + 0.06 } : p
    })
    const text = ['RT,Area', ...late.map((p) => `${p.retentionTime.toFixed(3)},${p.area.toFixed(1)}`)].join('\n')
    const drift = await uploadGc(student, gc.practicalId, text, { preview: true })
    expect(drift.status).toBe(200)
    const codes = drift.body.flags.map((f) => f.code)
    expect(codes).not.toContain('missing-product')
    expect(codes).not.toContain('unassigned-area')
    const drifted = drift.body.flags.filter((f) => f.code === 'retention-drift' && f.severity === 'warning')
    expect(drifted).toHaveLength(4)
    expect(drifted[0]!.message).toMatch(/came 0\.06 min after the end of the window for 1,[1-4]-dichlorobutane \(/)
    expect(drift.body.flags.some((f) => /All 4 peaks/.test(f.message))).toBe(true)
  })

  it('the class summary says what it compares with and carries the names and the reference', async () => {
    const summary = await (await gc.signIn(gc.instructor)).get(`/api/practicals/${gc.practicalId}/summary`)
    expect(summary.status).toBe(200)
    expect(summary.body.comparison.basis).toBe('reference')
    expect(summary.body.comparison.factors.secondaryToPrimary).toBeCloseTo(17.25 / 6.2, 6)
    expect(Object.fromEntries(summary.body.distribution.map((d) => [d.name, d.reference]))).toEqual({
      '1,1-dichlorobutane': 6, '1,2-dichlorobutane': 23, '1,3-dichlorobutane': 46, '1,4-dichlorobutane': 25,
    })
  })
})
