import { afterAll, beforeAll, describe, expect, inject, it, vi } from 'vitest'
import { sql } from 'kysely'
import { closeTestDb, testDb } from '../../support/db'
import { demoPracticalScope, insertVersion, newStudentUnit } from '../../support/services-fixtures'
import { stubNitroGlobals } from '../arrange'
import { latestClassResults, practicalSummary, practicalSummaryJson } from '../../../server/services/results'
import { practicalChemistry } from '../../../server/services/submissions/practical-chemistry'
import { factorStats, type FactorValue } from '../../../shared/utils/class-summary'
import { keyFactorValue, type KeyFactor } from '../../../shared/utils/key-factor'
import type { PracticalScope } from '../../../server/utils/access'
import type { ClassRow } from '../../../server/services/results'
import { closeDb } from '../../../server/utils/db'

// The engine worker is a build product: here its tasks run in the test's own thread.
vi.mock('../../../server/utils/engines', async () => {
  const { runEngineTask } = await import('../../../server/engines/tasks')
  return { runEngine: runEngineTask }
})

afterAll(async () => {
  await closeDb()
  await closeTestDb()
})

// The summary reads the class as one document shaped by PostgreSQL and remembers its answer by a
// fingerprint of the rows. Checked here against the figures computed the way the route did
// before, from latestClassResults (one object per result) and the statistics engine per group,
// and again after each kind of change a fingerprint must notice.
let scope: PracticalScope

beforeAll(async () => {
  stubNitroGlobals()
  vi.stubGlobal('useRuntimeConfig', () => ({ databaseUrl: inject('databaseUrl'), public: {}, engines: {} }))
  scope = await demoPracticalScope()
  const sections = scope.sessionSectionIds
  // Invented values: a tight class around 3.6, two far-off runs, some pending, one excluded.
  for (let i = 0; i < 40; i++) {
    const { studentId, unitKey } = await newStudentUnit()
    const factor = i === 7 ? 40 : i === 19 ? 0.08 : 3.6 + ((i * 37) % 11) / 20
    await insertVersion({
      practicalId: scope.practical.id, sectionId: sections[i % sections.length]!, unitKey, submittedBy: studentId, version: 1,
      status: i % 3 ? 'accepted' : 'pending', excluded: i === 23, factorSecondary: factor, factorTertiary: factor * 1.4,
    })
  }
})

/** The summary's figures as computed before: latestClassResults, then factorStats per group. */
async function previousFigures(s: PracticalScope) {
  const chemistry = await practicalChemistry(s.practical)
  const rows = await latestClassResults(s.practical.id, testDb())
  const included = rows.filter((r) => r.excludedAt === null)
  const keys = (['secondaryToPrimary', 'tertiaryToPrimary'] as const)
    .filter((k) => chemistry.products.some((p) => p.carbonClass === (k === 'secondaryToPrimary' ? 'secondary' : 'tertiary')))
  const settings = { test: s.course.outlierTest, alpha: s.course.outlierAlpha, zscoreLimit: s.course.zscoreLimit, maxOutliers: null }
  const setOf = (group: ClassRow[]) => {
    const unreviewed = new Set(group.filter((r) => r.status === 'pending').map((r) => r.submissionId))
    const of = (key: KeyFactor) => keys.includes(key)
      ? factorStats(group.flatMap((r): FactorValue[] => {
          const value = keyFactorValue(r, key)
          return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value }]
        }), settings, { withoutOutliers: false, unreviewed })
      : null
    return { secondaryToPrimary: of('secondaryToPrimary'), tertiaryToPrimary: of('tertiaryToPrimary') }
  }
  return {
    n: included.length,
    factors: setOf(included),
    bySection: s.sessionSectionIds.map((id) => ({ sectionId: id, factors: setOf(included.filter((r) => r.sectionId === id)) })),
    excluded: rows.filter((r) => r.excludedAt !== null).map((r) => r.submissionId),
    observed: chemistry.products.map((p) => {
      const xs = included.flatMap((r) => r.molePercents.filter((m) => m.smiles === p.smiles).map((m) => m.percent))
      return xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null
    }),
  }
}

async function expectSameAsBefore(s: PracticalScope) {
  const [now, before] = await Promise.all([practicalSummary(s, {}), previousFigures(s)])
  expect(now.n).toBe(before.n)
  expect(now.factors).toEqual(before.factors)
  expect(now.bySection.map((b) => ({ sectionId: b.sectionId, factors: b.factors })))
    .toEqual(before.bySection.filter((b) => now.bySection.some((x) => x.sectionId === b.sectionId)))
  expect(now.excluded.map((e) => e.submissionId)).toEqual(before.excluded)
  expect(now.distribution.map((d) => d.observed)).toEqual(before.observed)
  expect(JSON.parse(new TextDecoder().decode((await practicalSummaryJson(s, {})).bytes))).toEqual(JSON.parse(JSON.stringify(now)))
  return now
}

describe('practicalSummary', () => {
  it('gives the figures the route computed before, as an object and as JSON', async () => {
    const now = await expectSameAsBefore(scope)
    expect(now.n).toBeGreaterThan(30)
    expect(now.factors.secondaryToPrimary?.outliers.length).toBeGreaterThan(0)
  })

  it('notices an exclusion, a review and a new upload, each in its own transaction', async () => {
    const mine = await testDb().selectFrom('submissions').select(['id', 'unitKey', 'sectionId', 'submittedBy'])
      .where('practicalId', '=', scope.practical.id).where('unitKey', 'like', 'user:%').where('excludedAt', 'is', null)
      .orderBy('id', 'desc').limit(3).execute()
    const first = await practicalSummary(scope, {})

    await testDb().updateTable('submissions').set({ excludedAt: new Date(), exclusionReason: 'spilled' }).where('id', '=', mine[0]!.id).execute()
    const excluded = await expectSameAsBefore(scope)
    expect(excluded.n).toBe(first.n - 1)
    expect(excluded.excluded.map((e) => e.submissionId)).toContain(mine[0]!.id)

    // A review changes nothing but the status (and so what "pulls the mean"): still noticed.
    await testDb().updateTable('submissions').set({ status: 'accepted' }).where('id', '=', mine[1]!.id).execute()
    await expectSameAsBefore(scope)

    await insertVersion({
      practicalId: scope.practical.id, sectionId: mine[2]!.sectionId, unitKey: mine[2]!.unitKey, submittedBy: mine[2]!.submittedBy,
      version: 2, status: 'pending', factorSecondary: 9.5, factorTertiary: 12,
    })
    const uploaded = await expectSameAsBefore(scope)
    expect(uploaded.factors.secondaryToPrimary?.values.some((v) => v.value === 9.5)).toBe(true)
  })

  it('an update that writes the same values still gives a correct answer, and a reader of other sections gets theirs', async () => {
    await sql`update submissions set status = status where practical_id = ${scope.practical.id}`.execute(testDb())
    await expectSameAsBefore(scope)
    const ta: PracticalScope = { ...scope, role: 'ta', sectionIds: [scope.sessionSectionIds[0]!], sessionSectionIds: [scope.sessionSectionIds[0]!] }
    const seen = await practicalSummary(ta, {})
    expect(seen.bySection.map((b) => b.sectionId)).toEqual([scope.sessionSectionIds[0]])
    const asOwner = await practicalSummary(scope, {})
    expect(seen.factors).toEqual(asOwner.factors)
  })
})
