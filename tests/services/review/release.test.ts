import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRowsOf, demoPracticalScope, newActor } from '../../support/services-fixtures'
import { setPracticalRelease } from '../../../server/services/review'
import type { PracticalScope } from '../../../server/utils/access'
import type { Actor } from '../../../server/utils/audit'

// The manual release switch on the seeded practical, restored afterwards.
let scope: PracticalScope
let actor: Actor
let before: Date | null

beforeAll(async () => {
  scope = await demoPracticalScope()
  before = scope.practical.resultsReleasedAt
  actor = await newActor()
  await testDb().updateTable('practicals').set({ resultsReleasedAt: null }).where('id', '=', scope.practical.id).execute()
})

afterAll(async () => {
  await testDb().updateTable('practicals').set({ resultsReleasedAt: before }).where('id', '=', scope.practical.id).execute()
  await closeTestDb()
})

const releasedAt = async () => (await testDb().selectFrom('practicals').select('resultsReleasedAt')
  .where('id', '=', scope.practical.id).executeTakeFirstOrThrow()).resultsReleasedAt
const scopeWith = (policy: 'manual' | 'on-review', at: Date | null): PracticalScope => ({
  ...scope, course: { ...scope.course, releasePolicy: policy }, practical: { ...scope.practical, resultsReleasedAt: at },
})

describe('setPracticalRelease', () => {
  it('refuses to release by hand under another policy (409), and writes nothing', async () => {
    const auditBefore = (await auditRowsOf('practical', scope.practical.id)).length
    await expect(setPracticalRelease(testDb(), actor, scopeWith('on-review', null), true)).rejects.toMatchObject({ statusCode: 409 })
    expect(await releasedAt()).toBeNull()
    expect(await auditRowsOf('practical', scope.practical.id)).toHaveLength(auditBefore)
  })

  it('releases, keeps the first time when released again, and withdraws; each change audited once', async () => {
    const auditBefore = (await auditRowsOf('practical', scope.practical.id)).length
    const first = await setPracticalRelease(testDb(), actor, scopeWith('manual', null), true)
    expect(first.resultsReleasedAt).not.toBeNull()
    const at = await releasedAt()
    expect(at?.toISOString()).toBe(first.resultsReleasedAt)

    const again = await setPracticalRelease(testDb(), actor, scopeWith('manual', at), true)
    expect(again.resultsReleasedAt).toBe(first.resultsReleasedAt)

    // Withdrawing works under any policy, so a policy change never strands a release.
    expect((await setPracticalRelease(testDb(), actor, scopeWith('on-review', at), false)).resultsReleasedAt).toBeNull()
    expect(await releasedAt()).toBeNull()
    const rows = (await auditRowsOf('practical', scope.practical.id)).slice(auditBefore)
    expect(rows.map((r) => [r.action, r.actorId])).toEqual([
      ['practical.release', actor.id], ['practical.withdraw-release', actor.id],
    ])
  })
})
