import { afterAll, describe, expect, it } from 'vitest'
import { DEMO, signedIn } from '../support/http'
import { closeTestDb, createUser } from '../support/db'
import { insertResult } from '../support/fixtures'
import { makeNamedCourse, mean, median } from '../support/results'

afterAll(closeTestDb)

// t(0.975, 3) = 3.1824 and t(0.975, 2) = 4.3027 (NIST e-Handbook t table).
const T_0975 = { 2: 4.3027, 3: 3.1824 } as Record<number, number>
const sd = (xs: number[]) => Math.sqrt(xs.reduce((a, x) => a + (x - mean(xs)) ** 2, 0) / (xs.length - 1))

// Two courses in two terms running the same substrate (1-chlorobutane) with the same method
// (sulfuryl chloride and AIBN); invented values, with an excluded and a returned run that
// must not count.
async function twoTerms() {
  const earlier = await makeNamedCourse({ sections: 2, studentsPerSection: 3, term: 'Spring 2026 (fixture)' })
  const later = await makeNamedCourse({ sections: 1, studentsPerSection: 4, term: 'Fall 2026 (fixture)' })
  const a = [3.1, 3.4, 3.6, 2.9]
  const b = [2.8, 3.0, 3.3]
  for (const [i, v] of a.entries()) {
    await insertResult(earlier.practicalId, earlier.students[i]!.sectionId, earlier.students[i]!.id, { secondary: v })
  }
  await insertResult(earlier.practicalId, earlier.students[4]!.sectionId, earlier.students[4]!.id, { secondary: 40 }, { excluded: 'Solvent peak integrated as a product' })
  await insertResult(earlier.practicalId, earlier.students[5]!.sectionId, earlier.students[5]!.id, { secondary: 90 }, { status: 'returned' })
  for (const [i, v] of b.entries()) {
    await insertResult(later.practicalId, later.students[i]!.sectionId, later.students[i]!.id, { secondary: v })
  }
  return { earlier, later, a, b }
}

describe('GET /api/results/cross-term', () => {
  it('gives n, mean, 95 % CI and median per practical and per section that match the inserted results, and no names', async () => {
    const { earlier, later, a, b } = await twoTerms()
    const client = await signedIn(later.owner.email, later.owner.password)
    const reply = await client.get(`/api/results/cross-term?practicalId=${later.practicalId}`)
    expect(reply.status).toBe(200)
    expect(reply.body.keyFactor).toBe('secondaryToPrimary')
    const rows = reply.body.rows
    const mine = rows.find((r) => r.practicalId === later.practicalId)!
    const theirs = rows.find((r) => r.practicalId === earlier.practicalId)!
    expect(mine).toMatchObject({ courseCode: later.course.code, term: 'Fall 2026 (fixture)', n: 3, current: true, sectionCodes: ['S1'] })
    expect(mine.mean).toBeCloseTo(mean(b), 9)
    expect(mine.headline.value).toBeCloseTo(Math.exp(mean(b.map(Math.log))), 9)
    expect(mine.median).toBeCloseTo(median(b), 9)
    expect(mine.ci95![1] - mine.mean!).toBeCloseTo(T_0975[2]! * sd(b) / Math.sqrt(3), 3)
    // Another instructor's course in another term: aggregates only.
    expect(theirs).toMatchObject({ courseCode: earlier.course.code, term: 'Spring 2026 (fixture)', n: 4, current: false, sectionCodes: ['S1', 'S2'] })
    expect(theirs.mean).toBeCloseTo(mean(a), 9)
    expect(theirs.ci95![0]).toBeCloseTo(mean(a) - T_0975[3]! * sd(a) / Math.sqrt(4), 3)
    // Students 0–2 are in S1, 3 is in S2 (the excluded and the returned runs do not count).
    expect(theirs.sections.map((s) => [s.code, s.n])).toEqual([['S1', 3], ['S2', 1]])
    expect(theirs.sections[0]!.mean).toBeCloseTo(mean(a.slice(0, 3)), 9)
    const json = JSON.stringify(reply.body)
    for (const s of [...earlier.students, ...later.students]) {
      expect(json).not.toContain(s.name)
      expect(json).not.toContain(s.email)
    }
  })

  it('is for instructors who own the practical asked about; the query is validated', async () => {
    const { later } = await twoTerms()
    const ta = later.sections[0]!.ta
    expect((await (await signedIn(ta.email, ta.password)).get(`/api/results/cross-term?practicalId=${later.practicalId}`)).status).toBe(403)
    const student = later.students[0]!
    expect((await (await signedIn(student.email, student.password)).get(`/api/results/cross-term?practicalId=${later.practicalId}`)).status).toBe(403)
    const other = await createUser('instructor')
    expect((await (await signedIn(other.email, other.password)).get(`/api/results/cross-term?practicalId=${later.practicalId}`)).status).toBe(404)
    const owner = await signedIn(later.owner.email, later.owner.password)
    const bad = await owner.get('/api/results/cross-term?practicalId=abc')
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^practicalId:/)
  })
})

describe('GET /api/results and /api/results/practicals/:id', () => {
  it('lists the owner’s practicals with n and the headline factor; a TA sees only practicals run in their sections', async () => {
    const { earlier, a } = await twoTerms()
    const owner = await signedIn(earlier.owner.email, earlier.owner.password)
    const list = await owner.get('/api/results')
    expect(list.status).toBe(200)
    expect(list.body).toHaveLength(1)
    expect(list.body[0]).toMatchObject({ practicalId: earlier.practicalId, n: 4, keyFactor: 'secondaryToPrimary' })
    expect(list.body[0]!.mean).toBeCloseTo(mean(a), 9)
    // The list leads with the same figure as the class page: the geometric mean, exp(mean of ln x).
    expect(list.body[0]!.headline.statistic).toBe('geometric-mean')
    expect(list.body[0]!.headline.value).toBeCloseTo(Math.exp(mean(a.map(Math.log))), 9)
    const ta = earlier.sections[1]!.ta
    const taList = await (await signedIn(ta.email, ta.password)).get('/api/results')
    expect(taList.body.map((p) => p.practicalId)).toEqual([earlier.practicalId])
    const demoTa = await (await signedIn(DEMO.ta1)).get('/api/results')
    expect(demoTa.body.map((p) => p.practicalId)).not.toContain(earlier.practicalId)
    const student = await (await signedIn(DEMO.student(3))).get('/api/results')
    expect(student.status).toBe(403)
  })

  it('names the people behind results only in the caller’s own sections', async () => {
    const { earlier } = await twoTerms()
    const ta = earlier.sections[1]!.ta
    const detail = await (await signedIn(ta.email, ta.password)).get(`/api/results/practicals/${earlier.practicalId}`)
    expect(detail.status).toBe(200)
    expect(detail.body.role).toBe('ta')
    expect(detail.body.canSendDigests).toBe(false)
    expect(detail.body.sections.map((s) => s.code)).toEqual(['S2'])
    // S2 holds students 3–5: one counted, one excluded (still pending or accepted), one returned (left out).
    expect(detail.body.units.map((u) => u.label).sort()).toEqual([earlier.students[3]!.name, earlier.students[4]!.name].sort())
    const owner = await (await signedIn(earlier.owner.email, earlier.owner.password)).get(`/api/results/practicals/${earlier.practicalId}`)
    expect(owner.body.units).toHaveLength(5)
    expect(owner.body.outlier.test).toBe('gesd')
  })
})
