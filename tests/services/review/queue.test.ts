import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { demoPracticalScope, insertVersion, newActor, newStudentUnit } from '../../support/services-fixtures'
import type { ReviewerScope } from '../../../server/services/review'
import { reviewQueueOf, reviewQueueOrder } from '../../../server/services/review/queue'
import { buildGradeSheet } from '../../../server/services/review/grade-sheet'
import Papa from 'papaparse'
import { stubNitroGlobals } from '../arrange'

// The queue's reads without HTTP. A TA's queue chooses each unit's latest version among the units
// that have a version in the TA's sections only (it no longer reads the whole practical): it must
// give the rows, order and counts the owner's queue gives for those sections, and a unit whose
// latest version moved to another section must leave it as before.

vi.mock('../../../server/utils/db', async (importOriginal) => ({
  ...(await importOriginal<typeof import('../../../server/utils/db')>()),
  useDb: () => testDb(),
}))
// The chemistry runs in the engine worker of a built server; the queue reads only which factor
// leads, and the demo's first practical (1-chlorobutane, no tertiary C-H) leads with 2°:1°.
vi.mock('../../../server/services/submissions/practical-chemistry', () => ({
  practicalChemistry: async () => ({ keyFactor: 'secondaryToPrimary' }),
}))
afterAll(closeTestDb)
beforeAll(stubNitroGlobals)

let owner: ReviewerScope
let ta: ReviewerScope
let mine: number
let other: number

beforeAll(async () => {
  owner = { ...await demoPracticalScope(), role: 'owner' }
  ;[mine, other] = owner.sessionSectionIds as [number, number]
  ta = { ...owner, role: 'ta', sectionIds: [mine], sessionSectionIds: [mine] }
})

/** A fresh student's unit with one version per section given, oldest first (the student is each one's member). */
async function unitWithVersions(sections: number[], extra: { factorSecondary?: number, attention?: number } = {}) {
  const { studentId, unitKey } = await newStudentUnit()
  const rows = []
  for (const [i, sectionId] of sections.entries()) {
    const row = await insertVersion({
      practicalId: owner.practical.id, sectionId, unitKey, submittedBy: studentId, version: i + 1, ...extra,
    })
    await testDb().insertInto('submissionMembers').values({ submissionId: row.id, userId: studentId }).execute()
    rows.push(row)
  }
  return rows
}

const idsOf = (rows: Array<{ id: number }>) => rows.map((r) => r.id)

describe('the review queue in a TA\'s sections', () => {
  it('keeps the rows, order and counts of the owner\'s queue in those sections', async () => {
    const stays = await unitWithVersions([mine, mine], { attention: 1 })
    const arrives = await unitWithVersions([other, mine])
    const leaves = await unitWithVersions([mine, other])
    const [own, tas] = await Promise.all([reviewQueueOf(owner), reviewQueueOf(ta)])
    const ownInMine = own.rows.filter((r) => r.section.id === mine)
    expect(idsOf(tas.rows)).toEqual(idsOf(ownInMine))
    expect(tas.rows).toEqual(ownInMine)
    expect(idsOf(tas.rows)).toContain(stays[1]!.id)
    expect(idsOf(tas.rows)).toContain(arrives[1]!.id)
    // The unit's latest version is in the other section: neither version is the TA's to review.
    expect(idsOf(tas.rows)).not.toContain(leaves[0]!.id)
    expect(idsOf(tas.rows)).not.toContain(leaves[1]!.id)
    expect(idsOf(own.rows)).toContain(leaves[1]!.id)
    // The TA's filter lists their section only; the class the outlier test runs over stays whole.
    expect(tas.sections.map((s) => s.id)).toEqual([mine])
    expect(tas.outliers.run).toEqual(own.outliers.run)
  })

  it('orders and counts alike whether the people are read or not (a submission page\'s "next" and the home cards)', async () => {
    await unitWithVersions([mine], { attention: 2 })
    for (const scope of [owner, ta]) {
      const [full, order] = await Promise.all([reviewQueueOf(scope), reviewQueueOrder(scope)])
      expect(idsOf(order.rows)).toEqual(idsOf(full.rows))
      expect(order.rows.map((r) => [r.status, r.attention, r.submittedAt, r.excluded]))
        .toEqual(full.rows.map((r) => [r.status, r.attention, r.submittedAt, r.excluded !== null]))
      expect(order.sections).toEqual(full.sections)
    }
  })
})

describe('the grade sheet', () => {
  it('prints an accepted unit\'s marks from its latest acceptance, and leaves a unit that moved away out', async () => {
    const actor = await newActor()
    const [accepted] = await unitWithVersions([mine])
    const rubric = owner.course.rubric
    const fullMarks = Object.fromEntries(rubric.map((c) => [c.key, c.maxPoints]))
    const fullTotal = rubric.reduce((sum, c) => sum + c.maxPoints, 0)
    const lowered = { ...fullMarks, [rubric[0]!.key]: 0 }
    // Two acceptances: the later one (lower marks) is the one that counts.
    await testDb().insertInto('reviews').values([
      { submissionId: accepted!.id, reviewerId: actor.id, decision: 'accept', scores: JSON.stringify(fullMarks), total: fullTotal,
        createdAt: new Date('2026-11-01T10:00:00Z') },
      { submissionId: accepted!.id, reviewerId: actor.id, decision: 'accept', scores: JSON.stringify(lowered),
        total: fullTotal - rubric[0]!.maxPoints, createdAt: new Date('2026-11-02T10:00:00Z') },
    ]).execute()
    await testDb().updateTable('submissions').set({ status: 'accepted' }).where('id', '=', accepted!.id).execute()
    const leaves = await unitWithVersions([mine, other])
    const emailOf = async (userId: number) =>
      (await testDb().selectFrom('users').select('email').where('id', '=', userId).executeTakeFirstOrThrow()).email

    const { csv } = await buildGradeSheet(ta)
    const [header, ...rows] = Papa.parse<string[]>(csv.trim()).data
    const cell = (row: string[], name: string) => row[header!.indexOf(name)]
    const mail = await emailOf(accepted!.submittedBy)
    const row = rows.find((r) => cell(r, 'E-mail') === mail)!
    expect(cell(row, 'Status')).toBe('Accepted')
    expect(cell(row, `${rubric[0]!.label} (of ${rubric[0]!.maxPoints})`)).toBe('0')
    expect(Number(cell(row, 'Total'))).toBe(fullTotal - rubric[0]!.maxPoints)
    // The unit whose latest version went to the other section is not the TA's (and its student is not on their roster).
    const leaver = await emailOf(leaves[0]!.submittedBy)
    expect(rows.some((r) => cell(r, 'E-mail') === leaver)).toBe(false)
    // Every row of the sheet is one person of a unit in the TA's section, or one of its students with nothing yet.
    const sections = new Set(rows.map((r) => cell(r, 'Section')))
    const [code] = (await reviewQueueOf(ta)).sections.map((s) => s.code)
    expect([...sections]).toEqual([code])
  })
})
