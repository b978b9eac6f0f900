import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRows, coordinator, reagentInput, refusal } from './helpers'
import { addLot, createReagent, deleteReagent, linkItemToReagent, updateReagent } from '../../../server/services/stockroom'

afterAll(closeTestDb)

describe('catalog commands', () => {
  it('creates a reagent with its audit row, naming the actor and the address', async () => {
    const actor = await coordinator()
    const input = reagentInput()
    const row = await createReagent(testDb(), actor, input)
    expect(row.name).toBe(input.name)
    const audit = await auditRows('reagent', row.id)
    expect(audit.map((a) => a.action)).toEqual(['reagent.create'])
    expect(audit[0]!.actorId).toBe(actor.id)
    expect(audit[0]!.ip).toBe('192.0.2.7')
  })

  it('refuses a second reagent of the same name, case aside, and writes nothing', async () => {
    const actor = await coordinator()
    const first = await createReagent(testDb(), actor, reagentInput())
    const count = async () => (await testDb().selectFrom('reagents').select('id').execute()).length
    const before = await count()
    const error = await refusal(createReagent(testDb(), actor, reagentInput({ name: first.name.toUpperCase() })))
    expect(error.statusCode).toBe(409)
    expect(error.statusMessage).toMatch(/^name: /)
    expect(await count()).toBe(before)
  })

  it('keeps the unit while the reagent has lots: 409, the row and its audit trail unchanged', async () => {
    const db = testDb()
    const actor = await coordinator()
    const reagent = await createReagent(db, actor, reagentInput({ unit: 'mL', density: 1.5 }))
    await addLot(db, actor, reagent.id, {
      lotCode: 'A1', quantity: 100, unit: 'mL', containers: 1, location: '', receivedOn: '2026-01-10', openedOn: null, expiresOn: null,
    })
    const error = await refusal(updateReagent(db, actor, reagent.id, { unit: 'g' }))
    expect(error.statusCode).toBe(409)
    expect(error.statusMessage).toMatch(/^unit: /)
    const stored = await db.selectFrom('reagents').select(['unit']).where('id', '=', reagent.id).executeTakeFirstOrThrow()
    expect(stored.unit).toBe('mL')
    expect((await auditRows('reagent', reagent.id)).map((a) => a.action)).toEqual(['reagent.create'])
    // Without lots the same change goes through, with the fields before and after in its audit row.
    const bare = await createReagent(db, actor, reagentInput({ unit: 'mL', physicalState: 'liquid' }))
    const updated = await updateReagent(db, actor, bare.id, { unit: 'g' })
    expect(updated.unit).toBe('g')
    const audit = await auditRows('reagent', bare.id)
    expect(audit.map((a) => a.action)).toEqual(['reagent.create', 'reagent.update'])
    expect(audit[1]!.before).toMatchObject({ unit: 'mL' })
    expect(audit[1]!.after).toMatchObject({ unit: 'g' })
  })

  it('checks the rules across fields against the merged row', async () => {
    const actor = await coordinator()
    const reagent = await createReagent(testDb(), actor, reagentInput({ unit: 'g', physicalState: 'liquid', density: null }))
    // A solid is stocked by mass; mL for a solid is refused (common practice in stockrooms).
    const error = await refusal(updateReagent(testDb(), actor, reagent.id, { unit: 'mL', physicalState: 'solid' }))
    expect(error.statusCode).toBe(400)
    expect(error.statusMessage).toMatch(/^unit: /)
  })

  it('deletes only a reagent nothing refers to', async () => {
    const db = testDb()
    const actor = await coordinator()
    const stocked = await createReagent(db, actor, reagentInput())
    await addLot(db, actor, stocked.id, {
      lotCode: '', quantity: 5, unit: 'mL', containers: 1, location: '', receivedOn: '2026-02-01', openedOn: null, expiresOn: null,
    })
    expect((await refusal(deleteReagent(db, actor, stocked.id))).statusCode).toBe(409)
    expect(await db.selectFrom('reagents').select('id').where('id', '=', stocked.id).executeTakeFirst()).toBeDefined()

    const spare = await createReagent(db, actor, reagentInput())
    await deleteReagent(db, actor, spare.id)
    expect(await db.selectFrom('reagents').select('id').where('id', '=', spare.id).executeTakeFirst()).toBeUndefined()
    expect((await auditRows('reagent', spare.id)).map((a) => a.action)).toEqual(['reagent.create', 'reagent.delete'])
  })

  it('links a seeded practical item to a reagent, and refuses a % w/v strength for an item not in mL', async () => {
    const db = testDb()
    const actor = await coordinator()
    const reagent = await createReagent(db, actor, reagentInput({ unit: 'g', physicalState: 'solid', density: null }))
    const notMl = await db.selectFrom('practicalItems').select(['id', 'reagentId', 'solutionPercentWv']).where('basis', '!=', 'mL')
      .orderBy('id').executeTakeFirstOrThrow()
    const error = await refusal(linkItemToReagent(db, actor, notMl.id, { reagentId: reagent.id, percentWv: 10 }))
    expect(error.statusMessage).toMatch(/^percentWv: /)
    const unchanged = await db.selectFrom('practicalItems').select(['reagentId', 'solutionPercentWv'])
      .where('id', '=', notMl.id).executeTakeFirstOrThrow()
    expect(unchanged).toEqual({ reagentId: notMl.reagentId, solutionPercentWv: notMl.solutionPercentWv })

    const linked = await linkItemToReagent(db, actor, notMl.id, { reagentId: reagent.id, percentWv: null })
    expect(linked).toEqual({ practicalItemId: notMl.id, reagentId: reagent.id, solutionPercentWv: null })
    const audit = await auditRows('practical_item', notMl.id)
    expect(audit.at(-1)!.action).toBe('practical_item.reagent')
    expect(audit.at(-1)!.before).toEqual({ reagentId: notMl.reagentId, solutionPercentWv: notMl.solutionPercentWv })
    // Put the seeded link back, so other tests see the demo as it was.
    await linkItemToReagent(db, actor, notMl.id, { reagentId: notMl.reagentId, percentWv: notMl.solutionPercentWv })
  })
})
