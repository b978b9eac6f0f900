import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { demoPracticalScope, insertVersion, newStudentUnit } from '../../support/services-fixtures'
import { latestClassResults, latestUnitVersions } from '../../../server/services/results'
import type { PracticalScope } from '../../../server/utils/access'

afterAll(closeTestDb)

// The rule behind every class figure, the results list and the cross-term comparison: each work
// unit's newest version among accepted and pending ones. Several units of fresh students, each
// with its own history, in the seeded practical; only their rows are looked at.
describe('latestUnitVersions', () => {
  let scope: PracticalScope
  const ids: Record<string, number> = {}
  const units: Record<string, string> = {}

  beforeAll(async () => {
    scope = await demoPracticalScope()
    const base = { practicalId: scope.practical.id, sectionId: scope.sessionSectionIds[0]! }
    const unit = async (name: string, versions: Array<{ status: 'pending' | 'accepted' | 'returned', excluded?: boolean }>) => {
      const { studentId, unitKey } = await newStudentUnit()
      units[name] = unitKey
      for (const [i, v] of versions.entries()) {
        const row = await insertVersion({ ...base, unitKey, submittedBy: studentId, version: i + 1, factorSecondary: 3 + i, ...v })
        ids[`${name}.v${i + 1}`] = row.id
      }
    }
    // An older accepted version and a newer pending one: the newer one counts.
    await unit('acceptedThenPending', [{ status: 'accepted' }, { status: 'pending' }])
    // The newest was returned for resubmission: the accepted one before it still counts.
    await unit('acceptedThenReturned', [{ status: 'accepted' }, { status: 'returned' }])
    // Only returned versions: the unit has nothing in the class figures.
    await unit('onlyReturned', [{ status: 'returned' }, { status: 'returned' }])
    // The newest is excluded by a reviewer: it stays the unit's version (flagged), unless skipped.
    await unit('newestExcluded', [{ status: 'accepted' }, { status: 'pending', excluded: true }])
    await unit('single', [{ status: 'pending' }])
  })

  const mine = <T extends { unitKey: string }>(rows: T[]) => rows.filter((r) => Object.values(units).includes(r.unitKey))
  const byUnit = <T extends { unitKey: string }>(rows: T[]) => Object.fromEntries(
    Object.entries(units).map(([name, key]) => [name, rows.filter((r) => r.unitKey === key)]),
  )

  it('picks one version per unit: the newest accepted-or-pending, an excluded one kept and marked', async () => {
    const rows = mine(await latestUnitVersions(testDb(), [scope.practical.id])
      .select(['s.id', 's.unitKey', 's.version', 's.status', 's.excludedAt']).execute())
    const got = byUnit(rows)
    expect(got.acceptedThenPending!.map((r) => r.id)).toEqual([ids['acceptedThenPending.v2']])
    expect(got.acceptedThenReturned!.map((r) => r.id)).toEqual([ids['acceptedThenReturned.v1']])
    expect(got.onlyReturned).toEqual([])
    expect(got.newestExcluded!.map((r) => r.id)).toEqual([ids['newestExcluded.v2']])
    expect(got.newestExcluded![0]!.excludedAt).not.toBeNull()
    expect(got.single!.map((r) => r.id)).toEqual([ids['single.v1']])
    expect(rows).toHaveLength(4)
  })

  it('with skipExcluded, falls back to the newest version no reviewer excluded', async () => {
    const rows = mine(await latestUnitVersions(testDb(), [scope.practical.id], { skipExcluded: true })
      .select(['s.id', 's.unitKey']).execute())
    expect(byUnit(rows).newestExcluded!.map((r) => r.id)).toEqual([ids['newestExcluded.v1']])
  })

  it('with statuses, lets only those versions compete', async () => {
    const rows = mine(await latestUnitVersions(testDb(), [scope.practical.id], { statuses: ['accepted'] })
      .select(['s.id', 's.unitKey']).execute())
    const got = byUnit(rows)
    expect(got.acceptedThenPending!.map((r) => r.id)).toEqual([ids['acceptedThenPending.v1']])
    expect(got.single).toEqual([])
  })

  it('answers nothing for no practicals, and keeps practicals apart', async () => {
    expect(await latestUnitVersions(testDb(), []).select('s.id').execute()).toEqual([])
    const other = mine(await latestUnitVersions(testDb(), [scope.practical.id + 100_000]).select(['s.unitKey']).execute())
    expect(other).toEqual([])
  })

  it('is what the class figures read: latestClassResults gives the same versions with their factors', async () => {
    const rows = (await latestClassResults(scope.practical.id, testDb())).filter((r) => Object.values(units).includes(r.unitKey))
    expect(rows.map((r) => r.submissionId).sort((a, b) => a - b))
      .toEqual([ids['acceptedThenPending.v2'], ids['acceptedThenReturned.v1'], ids['newestExcluded.v2'], ids['single.v1']].sort((a, b) => a! - b!))
    // factorSecondary was 3 for version 1 and 4 for version 2 (stored as written).
    expect(rows.find((r) => r.submissionId === ids['acceptedThenPending.v2'])!.factorSecondary).toBe(4)
  })
})
