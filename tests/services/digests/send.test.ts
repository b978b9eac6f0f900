import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { demoPracticalScope, newActor } from '../../support/services-fixtures'
import { sendDigests } from '../../../server/services/digests'
import type { PracticalScope } from '../../../server/utils/access'
import type { Actor } from '../../../server/utils/audit'

afterAll(closeTestDb)

// The rules the send route used to hold, now in the command: which sections and which times it
// takes. A refused send writes no digest. (Queuing the messages needs the mail queue's workers
// and is covered end to end in tests/e2e/digest.test.ts.)
let scope: PracticalScope
let actor: Actor

beforeAll(async () => {
  scope = await demoPracticalScope()
  actor = await newActor()
})

const digestsBy = (userId: number) => testDb().selectFrom('digests').select('id').where('createdBy', '=', userId).execute()

describe('sendDigests refuses before writing', () => {
  it('a section that does not run the practical, naming it', async () => {
    const stranger = Math.max(0, ...scope.sessionSectionIds) + 100_000
    await expect(sendDigests(testDb(), actor, scope, {
      sectionIds: [scope.sessionSectionIds[0]!, stranger],
      sendAt: null,
      requestKey: null,
    }))
      .rejects.toMatchObject({ statusCode: 400, data: { field: 'sectionIds' }, statusMessage: `sectionIds: Section ${stranger} does not run this practical` })
    expect(await digestsBy(actor.id)).toEqual([])
  })

  it('a time more than a minute in the past', async () => {
    const section = scope.sessionSectionIds[0]!
    const past = new Date(Date.now() - 5 * 60_000)
    await expect(sendDigests(testDb(), actor, scope, { sectionIds: [section], sendAt: past, requestKey: null }))
      .rejects.toMatchObject({ statusCode: 400, data: { field: 'sendAt' } })
    expect(await digestsBy(actor.id)).toEqual([])
  })
})
