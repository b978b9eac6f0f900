import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { signedIn, DEMO } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { insertResult, makeCourse } from '../support/fixtures'

afterAll(closeTestDb)

// NIST/SEMATECH e-Handbook §1.3.5.17.1 (Grubbs' test): G = 2.4687, critical 2.1266 at α = 0.05
// two-sided; 245.57 is an outlier.
const NIST = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]
// t(0.975, 7) = 2.3646 (NIST e-Handbook t table).
const T_0975_7 = 2.3646

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length
const sd = (xs: number[]) => Math.sqrt(xs.reduce((a, x) => a + (x - mean(xs)) ** 2, 0) / (xs.length - 1))

async function nistPractical() {
  const world = await makeCourse({ sections: 2, studentsPerSection: 5 })
  const students = world.sections.flatMap((s) => s.students.map((st) => ({ ...st, sectionId: s.id })))
  const ids: number[] = []
  for (const [i, value] of NIST.entries()) {
    ids.push(await insertResult(world.practicalId, students[i]!.sectionId, students[i]!.id, { secondary: value }))
  }
  // A ninth run, excluded by a TA with a reason: listed, not counted.
  const excludedId = await insertResult(world.practicalId, students[8]!.sectionId, students[8]!.id, { secondary: 150 }, { excluded: 'Sample boiled dry; wrong product mixture' })
  // A tenth unit whose only version was returned: not counted either.
  await insertResult(world.practicalId, students[9]!.sectionId, students[9]!.id, { secondary: 500 }, { status: 'returned' })
  return { world, ids, excludedId }
}

describe('GET /api/practicals/:id/summary', () => {
  it('carries the NIST data through the database: mean, SD, 95 % CI, median, Grubbs outlier', async () => {
    const { world, ids, excludedId } = await nistPractical()
    const client = await signedIn(world.owner.email, world.owner.password)
    const reply = await client.get(`/api/practicals/${world.practicalId}/summary`)
    expect(reply.status).toBe(200)
    const s = reply.body
    expect(s.n).toBe(8)
    // 1-chlorobutane has no tertiary C–H: that factor does not apply.
    expect(s.factors.tertiaryToPrimary).toBeNull()
    const f = s.factors.secondaryToPrimary
    expect(f!.n).toBe(8)
    expect(f!.mean).toBeCloseTo(mean(NIST), 9)
    expect(f!.sd).toBeCloseTo(sd(NIST), 9)
    const half = T_0975_7 * sd(NIST) / Math.sqrt(8)
    expect(f!.ci95![0]).toBeCloseTo(mean(NIST) - half, 2)
    expect(f!.ci95![1]).toBeCloseTo(mean(NIST) + half, 2)
    expect(f!.median).toBeCloseTo((200.82 + 201.92) / 2, 9)
    expect(f!.outliers).toEqual([expect.objectContaining({ submissionId: ids[7], value: 245.57 })])
    expect(f!.outliers[0]!.statistic).toBeCloseTo(2.4687, 3)
    expect(s.excluded).toEqual([{ submissionId: excludedId, reason: 'Sample boiled dry; wrong product mixture' }])
    expect(s.bySection.map((b) => b.n).reduce((a: number, b: number) => a + b, 0)).toBe(8)
  })

  it('runs the test asked for: Dixon r10 (Rorabacher 1991, n = 8: Q95 = 0.526) and the modified z-score', async () => {
    const { world, ids } = await nistPractical()
    const client = await signedIn(world.owner.email, world.owner.password)
    const dixon = (await client.get(`/api/practicals/${world.practicalId}/summary?method=dixon`)).body.factors.secondaryToPrimary
    expect(dixon!.test.name).toBe('dixon')
    expect(dixon!.outliers[0]!.statistic).toBeCloseTo((245.57 - 202.18) / (245.57 - 199.31), 9)
    expect(dixon!.outliers[0]!.critical).toBe(0.526)
    const z = (await client.get(`/api/practicals/${world.practicalId}/summary?method=modified-z`)).body.factors.secondaryToPrimary
    expect(z!.outliers.map((o) => o.submissionId)).toEqual([ids[7]])
    const bad = await client.get(`/api/practicals/${world.practicalId}/summary?method=t-test`)
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^method:/)
  })

  it('previews the statistics without the flagged outliers', async () => {
    const { world } = await nistPractical()
    const client = await signedIn(world.owner.email, world.owner.password)
    const without = (await client.get(`/api/practicals/${world.practicalId}/summary?withoutOutliers=true`)).body.factors.secondaryToPrimary
    expect(without!.n).toBe(7)
    expect(without!.mean).toBeCloseTo(mean(NIST.slice(0, 7)), 9)
  })

  it('reports too few results for a test instead of failing', async () => {
    const world = await makeCourse({ sections: 1, studentsPerSection: 2 })
    const [a, b] = world.sections[0]!.students
    await insertResult(world.practicalId, world.sections[0]!.id, a!.id, { secondary: 3.1 })
    await insertResult(world.practicalId, world.sections[0]!.id, b!.id, { secondary: 3.6 })
    const client = await signedIn(world.owner.email, world.owner.password)
    const f = (await client.get(`/api/practicals/${world.practicalId}/summary`)).body.factors.secondaryToPrimary
    expect(f!.n).toBe(2)
    expect(f!.test.applied).toBe(false)
    expect(f!.test.note).toMatch(/at least 3/)
    expect(f!.outliers).toEqual([])
  })

  it('a TA gets only their own sections in bySection; a stranger student and the coordinator get nothing', async () => {
    const { world } = await nistPractical()
    const ta = world.sections[0]!.ta
    const reply = await (await signedIn(ta.email, ta.password)).get(`/api/practicals/${world.practicalId}/summary`)
    expect(reply.status).toBe(200)
    expect(reply.body.bySection.map((b) => b.sectionId)).toEqual([world.sections[0]!.id])
    expect(reply.body.n).toBe(8)
    const stranger = await signedIn(DEMO.student(9))
    expect((await stranger.get(`/api/practicals/${world.practicalId}/summary`)).status).toBe(404)
    expect((await (await signedIn(DEMO.coordinator)).get(`/api/practicals/${world.practicalId}/summary`)).status).toBe(403)
  })

  it('a reviewer\'s reason for an exclusion reaches the instructors and that section\'s TA only', async () => {
    const { world, excludedId } = await nistPractical()
    const read = async (user: { email: string, password: string }) =>
      (await (await signedIn(user.email, user.password)).get(`/api/practicals/${world.practicalId}/summary`)).body.excluded
    const reason = [{ submissionId: excludedId, reason: 'Sample boiled dry; wrong product mixture' }]
    const generic = [{ submissionId: excludedId, reason: 'Left out of the class figures by a reviewer.' }]
    // The excluded run is in the second section.
    expect(await read(world.sections[1]!.ta)).toEqual(reason)
    expect(await read(world.sections[0]!.ta)).toEqual(generic)
    expect(await read(world.sections[0]!.students[0]!)).toEqual(generic)
    expect(await read(world.sections[1]!.students[3]!)).toEqual(generic)
  })
})

// Two equal far-off runs among eight: repeated Grubbs' tests flag neither (masking); the
// generalized ESD test (Rosner, Technometrics 25 (1983) 165) flags both.
const MASKED = [10.0, 10.1, 9.9, 10.2, 9.8, 10.0, 15.0, 15.0]

async function practicalWith(values: number[], extra: { status?: 'pending' | 'accepted' } = {}) {
  const world = await makeCourse({ sections: 1, studentsPerSection: values.length })
  const students = world.sections[0]!.students
  const ids: number[] = []
  for (const [i, value] of values.entries()) {
    ids.push(await insertResult(world.practicalId, world.sections[0]!.id, students[i]!.id, { secondary: value }, extra))
  }
  return { world, ids, client: await signedIn(world.owner.email, world.owner.password) }
}

describe('the headline figure and the generalized ESD test', () => {
  it('the demo practical leads with the geometric mean of its key factor, an interval above zero, and runs the course test (gesd)', async () => {
    const practical = await testDb().selectFrom('practicals').select('id').where('title', '=', 'Chlorination of 1-chlorobutane').executeTakeFirstOrThrow()
    const s = (await (await signedIn(DEMO.instructor)).get(`/api/practicals/${practical.id}/summary`)).body
    const key = s.factors[s.keyFactor]
    expect(key!.test).toMatchObject({ name: 'gesd', applied: true })
    expect(key!.test.maxOutliers).toBeGreaterThanOrEqual(2)
    expect(s.headline).toMatchObject({ factor: s.keyFactor, statistic: 'geometric-mean', n: key!.n })
    expect(s.headline!.value).toBeCloseTo(key!.log.mean!, 9)
    expect(s.headline!.ci95![0]).toBeGreaterThan(0)
    expect(s.headline!.ci95![0]).toBeLessThan(s.headline!.value!)
    expect(key!.headline).toEqual(Object.fromEntries(Object.entries(s.headline!).filter(([k]) => k !== 'factor')))
    // Every contract field is still there.
    for (const field of ['n', 'mean', 'sd', 'ci95', 'median', 'mad', 'outliers', 'test']) expect(key).toHaveProperty(field)
    // The demo leaves its flagged runs waiting for review: they pull the arithmetic mean.
    const pendingFlagged = await testDb().selectFrom('submissions').select('id')
      .where('id', 'in', key!.outliers.length ? key!.outliers.map((o) => o.submissionId) : [-1]).where('status', '=', 'pending').execute()
    expect(s.headline!.unreviewedOutliers).toBe(pendingFlagged.length)
    expect(s.headline!.meanPulledByOutliers).toBe(pendingFlagged.length > 0)
  })

  it('?method=gesd flags both masked runs where Grubbs flags none; ?maxOutliers is honoured and validated', async () => {
    const { world, ids, client } = await practicalWith(MASKED)
    const url = `/api/practicals/${world.practicalId}/summary` as const
    const gesd = (await client.get(`${url}?method=gesd`)).body.factors.secondaryToPrimary!
    expect(gesd.test).toMatchObject({ name: 'gesd', applied: true, maxOutliers: 2 })
    expect(gesd.outliers.map((o) => o.submissionId).sort()).toEqual([ids[6], ids[7]].sort())
    expect(gesd.outliers.map((o) => o.step)).toEqual([1, 2])
    expect((await client.get(`${url}?method=grubbs`)).body.factors.secondaryToPrimary!.outliers).toEqual([])
    expect((await client.get(`${url}?method=gesd&maxOutliers=1`)).body.factors.secondaryToPrimary!.outliers).toEqual([])
    // The course default is the generalized ESD test (migration 2026_12_03_0930).
    expect((await client.get(url)).body.factors.secondaryToPrimary!.test.name).toBe('gesd')
    const bad = await client.get(`${url}?maxOutliers=0`)
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^maxOutliers:/)
  })

  it('a test that cannot run says so: Dixon on 12 results is applied: false with a note, never "no outliers"', async () => {
    const { world, client } = await practicalWith([...MASKED, 10.1, 9.9, 10.0, 10.05])
    const dixon = (await client.get(`/api/practicals/${world.practicalId}/summary?method=dixon`)).body.factors.secondaryToPrimary
    expect(dixon!.test).toMatchObject({ name: 'dixon', applied: false })
    expect(dixon!.test.note).toMatch(/3 to 10/)
    expect(dixon!.outliers).toEqual([])
    // NIST/SEMATECH e-Handbook §1.3.5.17.1: Grubbs' test is not for 6 or fewer values.
    const small = await practicalWith([3.1, 3.3, 3.2, 3.4, 3.0])
    const grubbs = (await small.client.get(`/api/practicals/${small.world.practicalId}/summary?method=grubbs`)).body.factors.secondaryToPrimary
    expect(grubbs!.test).toMatchObject({ name: 'grubbs', applied: true })
    expect(grubbs!.test.note).toMatch(/6 or fewer/)
  })

  it('a zero among the results puts the median in the lead with a rank interval inside the data', async () => {
    const { world, client } = await practicalWith([0, 2.9, 3.1, 3.3, 3.4, 3.6, 3.8])
    const s = (await client.get(`/api/practicals/${world.practicalId}/summary`)).body
    expect(s.headline).toMatchObject({ statistic: 'median', value: 3.3, ci95: [0, 3.8] })
    expect(s.headline!.interval).toMatchObject({ method: 'order-statistics', ranks: [1, 7] })
  })

  it('huge and unreadable stored factors give finite figures and a 200, never Infinity, NaN or a 500', async () => {
    const { world, ids, client } = await practicalWith([1e300, 2e300, 3e300, 4e300, 5e300, 6e300])
    const db = testDb()
    await sql`update submissions set factor_secondary = 'NaN'::numeric where id = ${ids[4]}`.execute(db)
    await sql`update submissions set factor_secondary = 1e400 where id = ${ids[5]}`.execute(db)
    const reply = await client.get(`/api/practicals/${world.practicalId}/summary`)
    expect(reply.status).toBe(200)
    const f = reply.body.factors.secondaryToPrimary
    expect(f!.n).toBe(4)
    expect(f!.mean! / 1e300).toBeCloseTo(2.5, 9)
    expect(f!.headline.statistic).toBe('geometric-mean')
    expect(Number.isFinite(f!.headline.ci95![1])).toBe(true)
    expect(f!.notes.join(' ')).toMatch(/2 stored results are not finite/)
    // JSON turns NaN and Infinity into null: every figure must still be a number.
    for (const x of [f!.mean, f!.sd, f!.median, f!.mad, ...f!.ci95!, f!.headline.value, ...f!.headline.ci95!, f!.log.mean]) expect(typeof x).toBe('number')
    expect((await client.get('/api/results')).status).toBe(200)
    expect((await client.get(`/api/results/cross-term?practicalId=${world.practicalId}`)).status).toBe(200)
    expect((await client.get(`/api/practicals/${world.practicalId}/queue`)).status).toBe(200)
  })
})
