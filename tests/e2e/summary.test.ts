import { afterAll, describe, expect, it } from 'vitest'
import { signedIn, DEMO } from '../support/http'
import { closeTestDb } from '../support/db'
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
  for (const [i, value] of NIST.entries()) ids.push(await insertResult(world.practicalId, students[i]!.sectionId, students[i]!.id, { secondary: value }))
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
    expect(f.n).toBe(8)
    expect(f.mean).toBeCloseTo(mean(NIST), 9)
    expect(f.sd).toBeCloseTo(sd(NIST), 9)
    const half = T_0975_7 * sd(NIST) / Math.sqrt(8)
    expect(f.ci95[0]).toBeCloseTo(mean(NIST) - half, 2)
    expect(f.ci95[1]).toBeCloseTo(mean(NIST) + half, 2)
    expect(f.median).toBeCloseTo((200.82 + 201.92) / 2, 9)
    expect(f.outliers).toEqual([expect.objectContaining({ submissionId: ids[7], value: 245.57 })])
    expect(f.outliers[0].statistic).toBeCloseTo(2.4687, 3)
    expect(s.excluded).toEqual([{ submissionId: excludedId, reason: 'Sample boiled dry; wrong product mixture' }])
    expect(s.bySection.map((b: any) => b.n).reduce((a: number, b: number) => a + b, 0)).toBe(8)
  })

  it('runs the test asked for: Dixon r10 (Rorabacher 1991, n = 8: Q95 = 0.526) and the modified z-score', async () => {
    const { world, ids } = await nistPractical()
    const client = await signedIn(world.owner.email, world.owner.password)
    const dixon = (await client.get(`/api/practicals/${world.practicalId}/summary?method=dixon`)).body.factors.secondaryToPrimary
    expect(dixon.test.name).toBe('dixon')
    expect(dixon.outliers[0].statistic).toBeCloseTo((245.57 - 202.18) / (245.57 - 199.31), 9)
    expect(dixon.outliers[0].critical).toBe(0.526)
    const z = (await client.get(`/api/practicals/${world.practicalId}/summary?method=modified-z`)).body.factors.secondaryToPrimary
    expect(z.outliers.map((o: any) => o.submissionId)).toEqual([ids[7]])
    const bad = await client.get(`/api/practicals/${world.practicalId}/summary?method=t-test`)
    expect(bad.status).toBe(400)
    expect(bad.body.statusMessage).toMatch(/^method:/)
  })

  it('previews the statistics without the flagged outliers', async () => {
    const { world } = await nistPractical()
    const client = await signedIn(world.owner.email, world.owner.password)
    const without = (await client.get(`/api/practicals/${world.practicalId}/summary?withoutOutliers=true`)).body.factors.secondaryToPrimary
    expect(without.n).toBe(7)
    expect(without.mean).toBeCloseTo(mean(NIST.slice(0, 7)), 9)
  })

  it('reports too few results for a test instead of failing', async () => {
    const world = await makeCourse({ sections: 1, studentsPerSection: 2 })
    const [a, b] = world.sections[0]!.students
    await insertResult(world.practicalId, world.sections[0]!.id, a!.id, { secondary: 3.1 })
    await insertResult(world.practicalId, world.sections[0]!.id, b!.id, { secondary: 3.6 })
    const client = await signedIn(world.owner.email, world.owner.password)
    const f = (await client.get(`/api/practicals/${world.practicalId}/summary`)).body.factors.secondaryToPrimary
    expect(f.n).toBe(2)
    expect(f.test.applied).toBe(false)
    expect(f.test.note).toMatch(/at least 3/)
    expect(f.outliers).toEqual([])
  })

  it('a TA gets only their own sections in bySection; a stranger student and the coordinator get nothing', async () => {
    const { world } = await nistPractical()
    const ta = world.sections[0]!.ta
    const reply = await (await signedIn(ta.email, ta.password)).get(`/api/practicals/${world.practicalId}/summary`)
    expect(reply.status).toBe(200)
    expect(reply.body.bySection.map((b: any) => b.sectionId)).toEqual([world.sections[0]!.id])
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
