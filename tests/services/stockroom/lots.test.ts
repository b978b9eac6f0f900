import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRows, coordinator, reagentInput, refusal } from './helpers'
import { addLot, createReagent, recordUsage, updateLot } from '../../../server/services/stockroom'

afterAll(closeTestDb)

const lot = (overrides: Partial<Parameters<typeof addLot>[3]> = {}): Parameters<typeof addLot>[3] => ({
  lotCode: 'L-1', quantity: 100, unit: 'mL', containers: 1, location: 'Cabinet 2', receivedOn: '2026-01-31', openedOn: null,
  expiresOn: null,
  ...overrides,
})

describe('lot commands', () => {
  it('keeps a lot in the reagent unit: mL through the density into g', async () => {
    const db = testDb()
    const actor = await coordinator()
    // 100 mL at 1.5 g/mL is 150 g (mass = volume × density).
    const reagent = await createReagent(db, actor, reagentInput({ unit: 'g', physicalState: 'liquid', density: 1.5 }))
    const view = await addLot(db, actor, reagent.id, lot())
    expect(view.quantity).toBe(150)
    expect(view.remaining).toBe(150)
    const audit = await auditRows('reagent_lot', view.id)
    expect(audit.map((a) => a.action)).toEqual(['lot.create'])
    expect(audit[0]!.after).toMatchObject({ reagentId: reagent.id, quantity: 150, unit: 'g' })
  })

  it('refuses a unit it cannot convert without a density, and writes nothing', async () => {
    const db = testDb()
    const actor = await coordinator()
    const reagent = await createReagent(db, actor, reagentInput({ unit: 'g', physicalState: 'solid', density: null }))
    const error = await refusal(addLot(db, actor, reagent.id, lot()))
    expect(error.statusCode).toBe(400)
    expect(error.statusMessage).toMatch(/^unit: /)
    expect(await db.selectFrom('reagentLots').select('id').where('reagentId', '=', reagent.id).execute()).toEqual([])
  })

  it('dates the expiry by the shelf life; a month from 31 January ends on the last day of February', async () => {
    const actor = await coordinator()
    const reagent = await createReagent(testDb(), actor, reagentInput({ shelfLifeMonths: 1 }))
    // 2026 is not a leap year: February has 28 days.
    expect((await addLot(testDb(), actor, reagent.id, lot())).expiresOn).toBe('2026-02-28')
    expect((await addLot(testDb(), actor, reagent.id, lot({ expiresOn: '2026-06-01' }))).expiresOn).toBe('2026-06-01')
  })

  it('records use, marks the lot opened on the first one, and never takes more than is left', async () => {
    const db = testDb()
    const actor = await coordinator()
    const reagent = await createReagent(db, actor, reagentInput())
    const created = await addLot(db, actor, reagent.id, lot({ quantity: 10 }))
    const used = await recordUsage(db, actor, created.id, { usedOn: '2026-02-03', amount: 4, note: 'Section 01', practicalId: null })
    expect(used.remaining).toBe(6)
    expect(used.openedOn).toBe('2026-02-03')

    const usageCount = async () => (await db.selectFrom('reagentUsage').select('id').where('lotId', '=', created.id).execute()).length
    const tooMuch = await refusal(recordUsage(db, actor, created.id, { usedOn: '2026-02-04', amount: 6.5, note: '', practicalId: null }))
    expect(tooMuch.statusCode).toBe(422)
    expect(tooMuch.statusMessage).toBe('amount: More than the lot holds (6 mL left)')
    const early = await refusal(recordUsage(db, actor, created.id, { usedOn: '2026-01-01', amount: 1, note: '', practicalId: null }))
    expect(early.statusMessage).toBe('usedOn: Before the lot was received')
    expect(await usageCount()).toBe(1)
    expect((await auditRows('reagent_lot', created.id)).map((a) => a.action)).toEqual(['lot.create', 'lot.use'])

    // Exactly what is left may be taken.
    expect((await recordUsage(db, actor, created.id, { usedOn: '2026-02-05', amount: 6, note: '', practicalId: null })).remaining).toBe(0)
  })

  it('refuses use against a practical that does not exist', async () => {
    const db = testDb()
    const actor = await coordinator()
    const created = await addLot(db, actor, (await createReagent(db, actor, reagentInput())).id, lot())
    const use = { usedOn: '2026-02-03', amount: 1, note: '', practicalId: 2_000_000_000 }
    const error = await refusal(recordUsage(db, actor, created.id, use))
    expect(error.statusMessage).toBe('practicalId: No such practical')
  })

  it('changes a lot, but never to an opening or expiry before it was received', async () => {
    const db = testDb()
    const actor = await coordinator()
    const created = await addLot(db, actor, (await createReagent(db, actor, reagentInput())).id, lot())
    const error = await refusal(updateLot(db, actor, created.id, { expiresOn: '2026-01-30' }))
    expect(error.statusMessage).toBe('expiresOn: The expiry is before the received date')
    const changed = await updateLot(db, actor, created.id, { location: 'Flammables cabinet', expiresOn: '2027-01-31' })
    expect(changed).toMatchObject({ location: 'Flammables cabinet', expiresOn: '2027-01-31', lotCode: 'L-1' })
    const audit = await auditRows('reagent_lot', created.id)
    expect(audit.map((a) => a.action)).toEqual(['lot.create', 'lot.update'])
    expect(audit[1]!.before).toMatchObject({ location: 'Cabinet 2', expiresOn: null })
  })
})
