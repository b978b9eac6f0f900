import Papa from 'papaparse'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { DANGER, WARNING, auditOf, insertUnitVersion, makeReviewWorld, reviewPeakTable, signInAs, uploadAs, type ReviewWorld } from '../support/review'

afterAll(closeTestDb)

// NIST/SEMATECH e-Handbook §1.3.5.17.1 (Grubbs' test): G = 2.4687 (2.46876 unrounded), critical
// value 2.1266 at α = 0.05 two-sided; 245.57 is an outlier.
const NIST = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]
const FULL = { accuracy: 10, chromatogram: 6, analysis: 4 }
const minutes = (n: number) => new Date(Date.UTC(2026, 9, 6, 9, n))

describe('who may review', () => {
  let world: ReviewWorld
  let mine: number
  let theirs: number
  let owner: Client
  beforeAll(async () => {
    world = await makeReviewWorld({ sections: 2, studentsPerSection: 4 })
    mine = await insertUnitVersion(world, { section: world.sections[0]!, station: 1, factor: 3.1 })
    theirs = await insertUnitVersion(world, { section: world.sections[1]!, station: 1, factor: 3.2 })
    owner = await signInAs(world.owner)
  })

  it('a TA of another section can neither open, review, exclude nor export that section’s work', async () => {
    const ta2 = await signInAs(world.sections[1]!.ta)
    expect((await ta2.get(`/api/submissions/${mine}`)).status).toBe(404)
    expect((await ta2.post(`/api/submissions/${mine}/review`, { decision: 'accept', scores: FULL })).status).toBe(404)
    expect((await ta2.post(`/api/submissions/${mine}/exclusion`, { reason: 'Not my section' })).status).toBe(404)
    expect((await ta2.get(`/submissions/${mine}/file`)).status).toBe(404)
    const queue = await ta2.get(`/api/practicals/${world.practicalId}/queue`)
    expect(queue.status).toBe(200)
    expect(queue.body.rows.map((r) => r.id)).toEqual([theirs])
    expect(queue.body.sections.map((s) => s.code)).toEqual(['R2'])
    const csv = await ta2.get(`/practicals/${world.practicalId}/grades.csv`)
    expect(csv.status).toBe(200)
    for (const s of world.sections[0]!.students) expect(csv.body).not.toContain(s.email)
    for (const s of world.sections[1]!.students) expect(csv.body).toContain(s.email)
    // Nothing was written by the refused review.
    expect((await testDb().selectFrom('reviews').select('id').where('submissionId', '=', mine).execute())).toEqual([])
    // Its own section's work is open to it.
    expect((await ta2.get(`/api/submissions/${theirs}`)).status).toBe(200)
  })

  it('the coordinator gets 403 on the queue, detail, review, exclusion, export and file routes', async () => {
    const coordinator = await signedIn(DEMO.coordinator)
    expect((await coordinator.get(`/api/practicals/${world.practicalId}/queue`)).status).toBe(403)
    expect((await coordinator.get('/api/review/practicals')).status).toBe(403)
    expect((await coordinator.get(`/api/submissions/${mine}`)).status).toBe(403)
    expect((await coordinator.post(`/api/submissions/${mine}/review`, { decision: 'accept', scores: FULL })).status).toBe(403)
    expect((await coordinator.post(`/api/submissions/${mine}/exclusion`, { reason: 'Stockroom says so' })).status).toBe(403)
    expect((await coordinator.post(`/api/practicals/${world.practicalId}/queue/accept`, { submissionIds: [mine] })).status).toBe(403)
    expect((await coordinator.get(`/practicals/${world.practicalId}/grades.csv`)).status).toBe(403)
    expect((await coordinator.get(`/submissions/${mine}/file`)).status).toBe(403)
  })

  it('a student gets 403 on them, but downloads their own original file', async () => {
    const student = await signInAs(world.sections[0]!.students[1]!)
    expect((await student.get(`/api/practicals/${world.practicalId}/queue`)).status).toBe(403)
    expect((await student.get(`/api/submissions/${mine}`)).status).toBe(403)
    expect((await student.post(`/api/submissions/${mine}/review`, { decision: 'accept', scores: FULL })).status).toBe(403)
    expect((await student.get(`/practicals/${world.practicalId}/grades.csv`)).status).toBe(403)
    expect((await student.get(`/submissions/${theirs}/file`)).status).toBe(403)
    // Their own unit (they are the partner, not the uploader).
    const own = await student.get(`/submissions/${mine}/file`)
    expect(own.status).toBe(200)
    expect(own.body).toContain('Peak,RT,Area')
  })

  it('an instructor who does not own the course gets 404; nobody signed in gets 401', async () => {
    const other = await signedIn(DEMO.instructor)
    expect((await other.get(`/api/practicals/${world.practicalId}/queue`)).status).toBe(404)
    expect((await other.get(`/api/submissions/${mine}`)).status).toBe(404)
    const anonymous = new Client()
    expect((await anonymous.get(`/api/submissions/${mine}`)).status).toBe(401)
    expect((await anonymous.get(`/practicals/${world.practicalId}/grades.csv`)).status).toBe(401)
    expect((await anonymous.get(`/submissions/${mine}/file`)).status).toBe(401)
  })

  it('the owner sees every section and the review list counts them', async () => {
    const queue = await owner.get(`/api/practicals/${world.practicalId}/queue`)
    expect(queue.body.rows.map((r) => r.id).sort()).toEqual([mine, theirs].sort())
    expect(queue.body.role).toBe('owner')
    const list = await owner.get('/api/review/practicals')
    expect(list.body).toEqual([expect.objectContaining({ id: world.practicalId, sections: ['R1', 'R2'], counts: expect.objectContaining({ pending: 2, accepted: 0 }) })])
  })

  it('a practical with submissions cannot be deleted (409)', async () => {
    const reply = await owner.request(`/api/practicals/${world.practicalId}`, { method: 'DELETE' })
    expect(reply.status).toBe(409)
    expect(reply.refusal.statusMessage).toMatch(/uploaded results/)
  })
})

describe('a review', () => {
  let world: ReviewWorld
  let ta: Client
  beforeAll(async () => {
    world = await makeReviewWorld({ sections: 1, studentsPerSection: 8 })
    ta = await signInAs(world.sections[0]!.ta)
  })

  it('accepts with rubric scores, totals on the server and is audited with before and after', async () => {
    const id = await insertUnitVersion(world, { section: world.sections[0]!, station: 1, factor: 3.2 })
    const reply = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: { accuracy: 9.5, chromatogram: 5, analysis: 4 }, comment: 'Clean separation.', total: 99 })
    expect(reply.status).toBe(200)
    expect(reply.body).toMatchObject({ id, status: 'accepted', total: 18.5 })
    const stored = await testDb().selectFrom('submissions').select('status').where('id', '=', id).executeTakeFirstOrThrow()
    expect(stored.status).toBe('accepted')
    const review = await testDb().selectFrom('reviews').selectAll().where('submissionId', '=', id).executeTakeFirstOrThrow()
    expect(review).toMatchObject({ decision: 'accept', total: 18.5, comment: 'Clean separation.', scores: { accuracy: 9.5, chromatogram: 5, analysis: 4 } })
    const [row] = await auditOf(id)
    expect(row).toMatchObject({ action: 'submission.accept', actorId: world.sections[0]!.ta.id })
    expect(row!.before).toEqual({ status: 'pending', scores: null, total: null })
    expect(row!.after).toMatchObject({ status: 'accepted', scores: { accuracy: 9.5, chromatogram: 5, analysis: 4 }, total: 18.5, reviewId: review.id })

    // Re-grading keeps the first scores as the "before".
    expect((await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: FULL })).status).toBe(200)
    const second = (await auditOf(id)).at(-1)!
    expect(second.before).toEqual({ status: 'accepted', scores: { accuracy: 9.5, chromatogram: 5, analysis: 4 }, total: 18.5 })
    expect(second.after).toMatchObject({ total: 20 })
  })

  it('a return needs a reason (400 naming reason) and keeps no scores', async () => {
    const id = await insertUnitVersion(world, { section: world.sections[0]!, station: 2, factor: 3.4 })
    const missing = await ta.post(`/api/submissions/${id}/review`, { decision: 'return', comment: 'See me.' })
    expect(missing.status).toBe(400)
    expect(missing.refusal.statusMessage).toMatch(/^reason: /)
    const blank = await ta.post(`/api/submissions/${id}/review`, { decision: 'return', reason: '   ' })
    expect(blank.status).toBe(400)
    expect(blank.refusal.data?.issues?.[0]?.field).toBe('reason')
    const ok = await ta.post(`/api/submissions/${id}/review`, { decision: 'return', reason: 'Peak b is integrated twice; integrate again.', scores: { accuracy: 3 } })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ status: 'returned', total: null, scores: {} })
    expect((await auditOf(id)).at(-1)).toMatchObject({ action: 'submission.return', after: expect.objectContaining({ status: 'returned', reason: 'Peak b is integrated twice; integrate again.' }) })
  })

  it('refuses scores outside 0…maxPoints, unknown criteria and missing ones, naming the criterion', async () => {
    const id = await insertUnitVersion(world, { section: world.sections[0]!, station: 3, factor: 3.0 })
    const high = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: { ...FULL, chromatogram: 7 } })
    expect(high.status).toBe(400)
    expect(high.refusal.statusMessage).toBe('scores.chromatogram: Chromatogram and peak assignment: give 0 to 6 points')
    const negative = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: { ...FULL, analysis: -1 } })
    expect(negative.status).toBe(400)
    expect(negative.refusal.statusMessage).toMatch(/^scores\.analysis: /)
    const unknown = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: { ...FULL, style: 2 } })
    expect(unknown.refusal.statusMessage).toBe('scores.style: Not a criterion of this course’s rubric')
    const partial = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: { accuracy: 10 } })
    expect(partial.status).toBe(400)
    expect(partial.refusal.data?.issues?.map((i) => i.field)).toEqual(['scores.chromatogram', 'scores.analysis'])
    expect((await testDb().selectFrom('submissions').select('status').where('id', '=', id).executeTakeFirstOrThrow()).status).toBe('pending')
  })

  it('only the latest version of a work unit can be reviewed (409)', async () => {
    const v1 = await insertUnitVersion(world, { section: world.sections[0]!, station: 4, factor: 3.0, version: 1 })
    const v2 = await insertUnitVersion(world, { section: world.sections[0]!, station: 4, factor: 3.1, version: 2 })
    const old = await ta.post(`/api/submissions/${v1}/review`, { decision: 'accept', scores: FULL })
    expect(old.status).toBe(409)
    expect(old.refusal.statusMessage).toMatch(/latest version/)
    expect((await ta.post(`/api/submissions/${v2}/review`, { decision: 'accept', scores: FULL })).status).toBe(200)
  })

  it('a run with a blocking flag is accepted only with a comment saying why', async () => {
    const section = world.sections[0]!
    // A second version of station 3's unit (its first was left pending above).
    const id = await insertUnitVersion(world, { section, station: 3, factor: 3.0, version: 2, flags: [DANGER] })
    const bare = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: FULL })
    expect(bare.status).toBe(400)
    expect(bare.refusal.statusMessage).toMatch(/^comment: /)
    const explained = await ta.post(`/api/submissions/${id}/review`, { decision: 'accept', scores: FULL, comment: 'Product b co-elutes with a on this column; checked the trace by hand.' })
    expect(explained.status).toBe(200)
  })
})

describe('the queue', () => {
  let world: ReviewWorld
  let ids: Record<'danger' | 'warning' | 'outlier' | 'oldest' | 'older' | 'newest' | 'acceptedA' | 'acceptedB' | 'returned', number>
  let owner: Client
  beforeAll(async () => {
    world = await makeReviewWorld({ sections: 2, studentsPerSection: 10 })
    const [r1, r2] = world.sections as [ReviewWorld['sections'][number], ReviewWorld['sections'][number]]
    // Key factors from the NIST Grubbs example, so the class test finds 245.57 (and only it).
    ids = {
      danger: await insertUnitVersion(world, { section: r1, station: 1, factor: NIST[0]!, flags: [DANGER], createdAt: minutes(5) }),
      warning: await insertUnitVersion(world, { section: r1, station: 2, factor: NIST[1]!, flags: [WARNING], createdAt: minutes(6) }),
      outlier: await insertUnitVersion(world, { section: r1, station: 3, factor: NIST[7]!, createdAt: minutes(2) }),
      oldest: await insertUnitVersion(world, { section: r2, station: 1, factor: NIST[2]!, createdAt: minutes(1) }),
      older: await insertUnitVersion(world, { section: r2, station: 2, factor: NIST[3]!, createdAt: minutes(3) }),
      newest: await insertUnitVersion(world, { section: r2, station: 3, factor: NIST[6]!, createdAt: minutes(7) }),
      acceptedA: await insertUnitVersion(world, { section: r1, station: 4, factor: NIST[4]!, status: 'accepted', createdAt: minutes(0) }),
      acceptedB: await insertUnitVersion(world, { section: r2, station: 4, factor: NIST[5]!, status: 'accepted', createdAt: minutes(4) }),
      // A returned run does not count in the class statistics, whatever its value.
      returned: await insertUnitVersion(world, { section: r1, station: 5, factor: 150, status: 'returned', createdAt: minutes(8) }),
    }
    owner = await signInAs(world.owner)
  })

  it('sorts blocking flags, then warnings and outliers, then other pending (oldest first), returned, accepted', async () => {
    const reply = await owner.get(`/api/practicals/${world.practicalId}/queue`)
    expect(reply.status).toBe(200)
    expect(reply.body.rows.map((r) => r.id)).toEqual([
      ids.danger, ids.outlier, ids.warning, ids.oldest, ids.older, ids.newest, ids.returned, ids.acceptedA, ids.acceptedB,
    ])
    expect(reply.body.counts).toEqual({ total: 9, pending: 6, accepted: 2, returned: 1, flagged: 3, excluded: 0 })
    const first = reply.body.rows[0]
    expect(first).toMatchObject({ version: 1, status: 'pending', keyFactor: NIST[0], attention: 2, clean: false, section: { code: 'R1' }, unit: { station: 1 } })
    expect(first!.unit.members).toHaveLength(2)
    expect(first!.unit.label).toBe(`${world.sections[0]!.students[0]!.name} & ${world.sections[0]!.students[1]!.name}`)
    expect(reply.body.practical).toMatchObject({ keyFactor: 'secondaryToPrimary' })
  })

  it('flags the outlier by the course’s test (Grubbs, NIST data) with its statistic and critical value', async () => {
    const reply = await owner.get(`/api/practicals/${world.practicalId}/queue?flag=outlier`)
    expect(reply.body.rows.map((r) => r.id)).toEqual([ids.outlier])
    const flag = reply.body.rows[0]!.flags.find((f) => f.code === 'outlier')
    expect(flag).toMatchObject({ severity: 'warning', test: 'grubbs' })
    // NIST/SEMATECH e-Handbook §1.3.5.17.1: G = 2.4687, critical 2.1266 (α = 0.05, two-sided).
    expect(flag!.statistic).toBeCloseTo(2.4687, 3)
    expect(flag!.critical).toBeCloseTo(2.1266, 3)
    expect(reply.body.outliers).toMatchObject({ test: 'grubbs', applied: true, n: 8 })
    expect(reply.body.rows[0]!.clean).toBe(false)
    const detail = await owner.get(`/api/submissions/${ids.outlier}`)
    expect(detail.body.flags.find((f) => f.code === 'outlier')!.statistic).toBeCloseTo(2.4687, 3)
  })

  it('flags with the generalized ESD test when the course uses it: R_1 = G, λ_1 = the Grubbs critical value (NIST data)', async () => {
    const courses = testDb().updateTable('courses').where('id', '=', world.courseId)
    await courses.set({ outlierTest: 'gesd' }).execute()
    try {
      const reply = await owner.get(`/api/practicals/${world.practicalId}/queue?flag=outlier`)
      expect(reply.body.rows.map((r) => r.id)).toEqual([ids.outlier])
      const flag = reply.body.rows[0]!.flags.find((f) => f.code === 'outlier')
      expect(flag).toMatchObject({ severity: 'warning', test: 'gesd', step: 1 })
      // NIST/SEMATECH e-Handbook §1.3.5.17.1 and §1.3.5.17.3: with one outlier, R_1 = G = 2.4687, λ_1 = 2.1266.
      expect(flag!.statistic).toBeCloseTo(2.4687, 3)
      expect(flag!.critical).toBeCloseTo(2.1266, 3)
      expect(flag!.message).toMatch(/generalized ESD test \(α = 0\.05, up to 2 outliers\): removed at step 1/)
      expect(reply.body.outliers).toMatchObject({ test: 'gesd', applied: true, n: 8, maxOutliers: 2 })
    } finally {
      await courses.set({ outlierTest: 'grubbs' }).execute()
    }
  })

  it('filters by section, status and flag; bad filters are 400 naming the field', async () => {
    const r2 = await owner.get(`/api/practicals/${world.practicalId}/queue?section=${world.sections[1]!.id}`)
    expect(r2.body.rows.map((r) => r.id)).toEqual([ids.oldest, ids.older, ids.newest, ids.acceptedB])
    expect(r2.body.counts.total).toBe(4)
    const accepted = await owner.get(`/api/practicals/${world.practicalId}/queue?status=accepted`)
    expect(accepted.body.rows.map((r) => r.id)).toEqual([ids.acceptedA, ids.acceptedB])
    const drift = await owner.get(`/api/practicals/${world.practicalId}/queue?flag=retention-drift`)
    expect(drift.body.rows.map((r) => r.id)).toEqual([ids.warning])
    expect(drift.body.flagCodes).toEqual(expect.arrayContaining([{ code: 'outlier', count: 1 }, { code: 'missing-product', count: 1 }]))
    // "any": every run that needs attention (a blocking flag, a warning or a class outlier), none of the clean ones.
    const any = (await owner.get(`/api/practicals/${world.practicalId}/queue?status=pending&flag=any`)).body.rows.map((r) => r.id)
    expect(any).toEqual(expect.arrayContaining([ids.danger, ids.outlier, ids.warning]))
    expect(any).not.toContain(ids.oldest)
    expect(any).not.toContain(ids.newest)
    const bad = await owner.get(`/api/practicals/${world.practicalId}/queue?status=done`)
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toMatch(/^status: /)
  })

  it('bulk accept takes only the clean rows, scores accuracy and leaves the parts a person reads empty, each audited', async () => {
    const reply = await owner.post(`/api/practicals/${world.practicalId}/queue/accept`, {
      submissionIds: [ids.oldest, ids.danger, ids.outlier, ids.warning, ids.acceptedA, ids.older, 999_999_999],
    })
    expect(reply.status).toBe(200)
    expect(reply.body.accepted.map((a) => a.id)).toEqual([ids.oldest, ids.older])
    // A factor of ~200 against the expected 2.78 (the seeded reference distribution) is far beyond 3 × 15 %: no accuracy points.
    // The chromatogram and the calculation and discussion need a person: empty, and no total until they are marked.
    expect(reply.body.accepted[0]).toEqual({ id: ids.oldest, scores: { accuracy: 0 }, total: null, toMark: ['chromatogram', 'analysis'] })
    const stored = await testDb().selectFrom('reviews').select(['scores', 'total']).where('submissionId', '=', ids.oldest).executeTakeFirstOrThrow()
    expect(stored).toEqual({ scores: { accuracy: 0 }, total: null })
    const queue = await owner.get(`/api/practicals/${world.practicalId}/queue?status=accepted`)
    expect(queue.body.rows.filter((r) => r.toMark).map((r) => r.id).sort()).toEqual([ids.oldest, ids.older].sort())
    const skipped = Object.fromEntries(reply.body.skipped.map((s) => [s.id, s.reason]))
    expect(Object.keys(skipped).map(Number).sort()).toEqual([ids.danger, ids.outlier, ids.warning, ids.acceptedA, 999_999_999].sort())
    expect(skipped[ids.outlier]).toMatch(/outlier/)
    expect(skipped[ids.acceptedA]).toMatch(/Already accepted/)
    for (const id of [ids.oldest, ids.older]) {
      expect((await auditOf(id)).at(-1)).toMatchObject({ action: 'submission.accept', before: { status: 'pending', scores: null, total: null }, after: expect.objectContaining({ status: 'accepted', bulk: true }) })
    }
    expect(await auditOf(ids.danger)).toEqual([])
    // The later pass: a full review fills them in and the total appears.
    const later = await owner.post(`/api/submissions/${ids.older}/review`, { decision: 'accept', scores: { accuracy: 0, chromatogram: 5, analysis: 3 } })
    expect(later.body).toMatchObject({ status: 'accepted', total: 8 })
    const after = await owner.get(`/api/practicals/${world.practicalId}/queue?status=accepted`)
    expect(after.body.rows.find((r) => r.id === ids.older)!.toMark).toBe(false)
  })

  it('excluding a run is audited, shown in the queue and takes it out of the class test', async () => {
    const short = await owner.post(`/api/submissions/${ids.outlier}/exclusion`, { reason: 'no' })
    expect(short.status).toBe(400)
    expect(short.refusal.statusMessage).toMatch(/^reason: /)
    const reason = 'Reflux ran dry; the mixture is mostly trichlorides'
    const reply = await owner.post(`/api/submissions/${ids.outlier}/exclusion`, { reason })
    expect(reply.status).toBe(200)
    expect(reply.body.excluded).toMatchObject({ reason, by: world.owner.name })
    expect((await auditOf(ids.outlier)).at(-1)).toMatchObject({ action: 'submission.exclude', before: { excluded: false, reason: null }, after: { excluded: true, reason } })
    const queue = await owner.get(`/api/practicals/${world.practicalId}/queue`)
    const row = queue.body.rows.find((r) => r.id === ids.outlier)
    expect(row!.excluded).toMatchObject({ reason, by: world.owner.name })
    // Seven values left: none is an outlier now.
    expect(row!.flags.map((f) => f.code)).not.toContain('outlier')
    expect(queue.body.outliers.n).toBe(7)
    expect(queue.body.counts.excluded).toBe(1)

    const back = await owner.request(`/api/submissions/${ids.outlier}/exclusion`, { method: 'DELETE' })
    expect(back.status).toBe(200)
    expect(back.body.excluded).toBeNull()
    expect((await auditOf(ids.outlier)).at(-1)).toMatchObject({ action: 'submission.include', before: { excluded: true, reason }, after: { excluded: false } })
  })

  it('has no outlier flag until the test can run (Dixon needs three results)', async () => {
    const small = await makeReviewWorld({ sections: 1, studentsPerSection: 4, outlierTest: 'dixon' })
    await insertUnitVersion(small, { section: small.sections[0]!, station: 1, factor: 3.0 })
    await insertUnitVersion(small, { section: small.sections[0]!, station: 2, factor: 30 })
    const client = await signInAs(small.owner)
    const reply = await client.get(`/api/practicals/${small.practicalId}/queue`)
    expect(reply.body.outliers).toMatchObject({ test: 'dixon', applied: false, n: 2 })
    expect(reply.body.rows.flatMap((r) => r.flags)).toEqual([])
    expect(reply.body.rows.every((r) => r.clean)).toBe(true)
  })
})

describe('the detail and the original file', () => {
  let world: ReviewWorld
  let ta: Client
  let v1: Awaited<ReturnType<typeof uploadAs>>
  let v2: Awaited<ReturnType<typeof uploadAs>>
  const fileName = `=cmd|' /C calc'!A0.csv`
  beforeAll(async () => {
    world = await makeReviewWorld({ sections: 1, studentsPerSection: 4 })
    ta = await signInAs(world.sections[0]!.ta)
    const student = await signInAs(world.sections[0]!.students[0]!)
    v1 = await uploadAs(student, world.practicalId, reviewPeakTable(world, 11), 'first run.csv')
    expect(v1.status).toBe(201)
    // The resubmission: product d (1,4-dichlorobutane) integrated 40 % larger.
    const d = world.truth.find((p) => p.smiles === 'ClCCCCCl')!.smiles
    v2 = await uploadAs(student, world.practicalId, reviewPeakTable(world, 12, { scale: { [d]: 1.4 } }), 'second run.csv')
    expect(v2.status, JSON.stringify(v2.body)).toBe(201)
    expect(v2.body.version).toBe(2)
    // A formula-looking original name, set directly: h3's multipart reader drops any file name
    // containing "=" (reported to the lead), so it cannot arrive through the upload today.
    const stored = await testDb().selectFrom('submissions').select('fileId').where('id', '=', v2.body.id).executeTakeFirstOrThrow()
    await testDb().updateTable('files').set({ originalName: fileName }).where('id', '=', stored.fileId).execute()
  })

  it('shows peaks, result, distributions, every version and the diff from the previous one', async () => {
    const reply = await ta.get(`/api/submissions/${v2.body.id}`)
    expect(reply.status).toBe(200)
    const d = reply.body
    expect(d).toMatchObject({ id: v2.body.id, version: 2, isLatest: true, latestId: v2.body.id, status: 'pending', fileName })
    expect(d.unit.members.map((m) => m.id).sort()).toEqual(world.sections[0]!.students.slice(0, 2).map((s) => s.id).sort())
    expect(d.peaks.length).toBeGreaterThanOrEqual(6)
    expect(d.peaks.filter((p) => p.assignedTo === 'solvent')).toHaveLength(1)
    expect(d.distribution).toHaveLength(4)
    for (const row of d.distribution) {
      expect(row).toEqual(expect.objectContaining({
        label: expect.any(String),
        statistical: expect.any(Number),
        predicted: expect.any(Number),
        observed: expect.any(Number),
      }))
    }
    // Statistical: per H; 1-chlorobutane has 2 + 2 + 2 + 3 H at its four positions.
    expect(d.distribution.map((r) => r.statistical).reduce((a: number, b: number) => a + b, 0)).toBeCloseTo(100, 6)
    expect(d.versions.map((v) => [v.id, v.version, v.fileName])).toEqual([[v1.body.id, 1, 'first run.csv'], [v2.body.id, 2, fileName]])
    expect(d.diff).toMatchObject({ fromId: v1.body.id, toId: v2.body.id, fromVersion: 1, toVersion: 2 })
    const dRow = d.diff!.molePercents.find((m) => m.smiles === 'ClCCCCCl')
    expect(dRow!.delta).toBeGreaterThan(2)
    expect(d.diff!.peaks.some((p) => p.assignedTo === 'ClCCCCCl' && p.change === 'changed')).toBe(true)
    expect(d.diff!.factors[0]).toMatchObject({ name: 'secondaryToPrimary', before: v1.body.result.factors.secondaryToPrimary, after: v2.body.result.factors.secondaryToPrimary })
    expect(d.rubric.map((c) => c.key)).toEqual(['accuracy', 'chromatogram', 'analysis'])
    expect(d.suggestion).toMatchObject({ tolerancePercent: 15, observed: d.keyFactor })
    // The shared 1-chlorobutane has a reference distribution for sulfuryl chloride, 6 / 23 / 46 / 25 %
    // (seeded, from memory): its pooled 2°:1° is ((23 + 46) / 4) / ((6 + 25) / 5) = 17.25 / 6.2.
    expect(d.suggestion.expected).toBeCloseTo(17.25 / 6.2, 6)
    expect(d.suggestion.comparedWith).toMatch(/^the reference distribution from /)
    expect(d.distribution.map((r) => r.name).sort()).toEqual(['1,1-dichlorobutane', '1,2-dichlorobutane', '1,3-dichlorobutane', '1,4-dichlorobutane'])
    expect(d.distribution.map((r) => r.reference ?? 0).reduce((a, b) => a + b, 0)).toBeCloseTo(100, 6)
    expect(d.nextPendingId).toBeNull()
  })

  it('compares with a chosen version (?compare=) and refuses one of another unit', async () => {
    const chosen = await ta.get(`/api/submissions/${v1.body.id}?compare=${v2.body.id}`)
    expect(chosen.body.isLatest).toBe(false)
    expect(chosen.body.diff).toMatchObject({ fromId: v1.body.id, toId: v2.body.id })
    const other = await insertUnitVersion(world, { section: world.sections[0]!, station: 2, factor: 3 })
    const bad = await ta.get(`/api/submissions/${v2.body.id}?compare=${other}`)
    expect(bad.status).toBe(400)
    expect(bad.refusal.statusMessage).toBe('compare: Not a version of this work unit')
    expect((await ta.get(`/api/submissions/${v1.body.id}`)).body.diff).toBeNull()
  })

  it('downloads the original bytes as an attachment with a safe name, never sniffed', async () => {
    const reply = await ta.get(`/submissions/${v2.body.id}/file`)
    expect(reply.status).toBe(200)
    expect(reply.headers.get('content-type')).toMatch(/^text\/plain/)
    expect(reply.headers.get('x-content-type-options')).toBe('nosniff')
    const disposition = reply.headers.get('content-disposition')!
    expect(disposition).toMatch(/^attachment; filename="submission-\d+-v2-[\w.-]+"$/)
    // The formula-looking name comes out with only letters, digits, dot, dash and underscore.
    expect(disposition).toBe(`attachment; filename="submission-${v2.body.id}-v2-cmd_C_calc_A0.csv"`)
    const stored = await testDb().selectFrom('submissions').innerJoin('files', 'files.id', 'submissions.fileId').select('files.content').where('submissions.id', '=', v2.body.id).executeTakeFirstOrThrow()
    expect(reply.body).toBe(stored.content.toString('utf8'))
  })
})

describe('the grade CSV', () => {
  it('one row per student, formula-looking names neutralised, numbers unquoted', async () => {
    const attack = `=cmd|' /C calc'!A0`
    const world = await makeReviewWorld({ sections: 2, studentsPerSection: 4, name: (i, j) => (i === 0 && j === 0 ? attack : `Student ${i}-${j}`) })
    const [r1, r2] = world.sections as [ReviewWorld['sections'][number], ReviewWorld['sections'][number]]
    // Registrar ids for all but the last student of R2, who shows that a missing id is an empty cell.
    const idOf = new Map(world.sections.flatMap((s, i) => s.students.map((st, j) => [st.id, `T${i}${j}-${world.courseId}`] as const)))
    const withoutId = r2.students.at(-1)!
    for (const [userId, studentId] of idOf) {
      if (userId === withoutId.id) continue
      await testDb().updateTable('enrollments').set({ studentId }).where('userId', '=', userId).where('courseId', '=', world.courseId).execute()
    }
    const accepted = await insertUnitVersion(world, { section: r1, station: 1, factor: 3.2 })
    await insertUnitVersion(world, { section: r2, station: 1, factor: 3.5, late: true })
    const owner = await signInAs(world.owner)
    expect((await owner.post(`/api/submissions/${accepted}/review`, { decision: 'accept', scores: { accuracy: 9.5, chromatogram: 6, analysis: 3 } })).status).toBe(200)
    const reply = await owner.get(`/practicals/${world.practicalId}/grades.csv`)
    expect(reply.status).toBe(200)
    expect(reply.headers.get('content-type')).toMatch(/^text\/csv/)
    expect(reply.headers.get('content-disposition')).toMatch(/^attachment; filename="REV_[\w-]+-grades\.csv"$/)
    const text: string = reply.body.replace(/^\uFEFF/, '')
    const lines = text.trim().split('\r\n')
    // OWASP CSV injection guidance: the cell starts with a quote, so no spreadsheet runs it.
    const attackLine = lines.find((l) => l.includes('cmd|'))!
    expect(attackLine.startsWith(`"${idOf.get(r1.students[0]!.id)}","'=cmd|' /C calc'!A0",`)).toBe(true)
    // Numbers stay numbers: station, version, factor, scores and total are unquoted.
    expect(attackLine).toContain(',1,1,"Accepted",3.2,9.5,6,3,18.5,"no","no",')
    const parsed = Papa.parse<string[]>(text, { skipEmptyLines: true }).data
    const [header, ...rows] = parsed
    // The student id leads, so the sheet can be matched to the registrar's list.
    expect(header).toEqual(['Student ID', 'Student', 'E-mail', 'Section', 'Station', 'Version', 'Status', 'Selectivity 2°:1°',
      'Selectivity against the literature value (of 10)', 'Chromatogram and peak assignment (of 6)', 'Calculation and discussion (of 4)',
      'Total', 'Late', 'Excluded from class statistics', 'Exclusion reason'])
    // Eight students: both partners of each uploaded unit, and the rest with no submission.
    expect(rows).toHaveLength(8)
    const partner = rows.find((r) => r[2] === r1.students[1]!.email)!
    expect(partner[0]).toBe(idOf.get(r1.students[1]!.id))
    expect(partner.slice(3, 12)).toEqual(['R1', '1', '1', 'Accepted', '3.2', '9.5', '6', '3', '18.5'])
    const pending = rows.filter((r) => r[3] === 'R2' && r[4] === '1')
    expect(pending.map((r) => [r[6], r[11], r[12]])).toEqual([['Waiting for review', '', 'yes'], ['Waiting for review', '', 'yes']])
    expect(rows.filter((r) => r[6] === 'No submission')).toHaveLength(4)
    // Every row carries its student's own id; the one student without an id has an empty first cell.
    for (const r of rows) {
      const student = world.sections.flatMap((s) => s.students).find((st) => st.email === r[2])!
      expect(r[0]).toBe(student.id === withoutId.id ? '' : idOf.get(student.id))
    }
  })
})

describe('release (manual policy)', () => {
  it('the owner releases and withdraws, audited; a TA may not; other policies refuse (409)', async () => {
    const world = await makeReviewWorld({ sections: 1, studentsPerSection: 0, releasePolicy: 'manual' })
    const owner = await signInAs(world.owner)
    const ta = await signInAs(world.sections[0]!.ta)
    expect((await ta.post(`/api/practicals/${world.practicalId}/release`)).status).toBe(403)
    const released = await owner.post(`/api/practicals/${world.practicalId}/release`)
    expect(released.status).toBe(200)
    expect(released.body.resultsReleasedAt).toEqual(expect.any(String))
    const stored = await testDb().selectFrom('practicals').select('resultsReleasedAt').where('id', '=', world.practicalId).executeTakeFirstOrThrow()
    expect(stored.resultsReleasedAt?.toISOString()).toBe(released.body.resultsReleasedAt)
    const withdrawn = await owner.request(`/api/practicals/${world.practicalId}/release`, { method: 'DELETE' })
    expect(withdrawn.body.resultsReleasedAt).toBeNull()
    const audits = await testDb().selectFrom('auditLog').select(['action', 'before', 'after']).where('entity', '=', 'practical').where('entityId', '=', String(world.practicalId)).orderBy('id').execute()
    expect(audits.map((a) => a.action)).toEqual(['practical.release', 'practical.withdraw-release'])
    expect(audits[0]!.before).toEqual({ resultsReleasedAt: null })

    const automatic = await makeReviewWorld({ sections: 1, studentsPerSection: 0 })
    const other = await signInAs(automatic.owner)
    expect((await other.post(`/api/practicals/${automatic.practicalId}/release`)).status).toBe(409)
  })
})
