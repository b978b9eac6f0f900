import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRows, coordinator, reagentInput, refusal } from './helpers'
import {
  closeOrderRest, createOrderSheet, createReagent, deleteOrderSheet, receiveOrder, sendOrderSheet, updateOrderSheet,
} from '../../../server/services/stockroom'

afterAll(closeTestDb)

async function draftWithLine(unit: 'g' | 'mL' = 'mL') {
  const db = testDb()
  const actor = await coordinator()
  const reagent = await createReagent(db, actor, reagentInput({ unit, physicalState: 'liquid', density: 1.2, shelfLifeMonths: 12 }))
  const sheet = await createOrderSheet(db, actor, { title: 'Spring restock' })
  const line = { reagentId: reagent.id, name: reagent.name, supplierName: '', supplierEmail: null, catalogNumber: '', containers: 2,
    containerSize: 250, unit, note: '' }
  const detail = await updateOrderSheet(db, actor, sheet.id, { lines: [line] })
  return { db, actor, reagent, sheet: detail, line }
}

/** As if the requests went out on 2 March 2026 (the mail itself is the e2e tests' business). */
const markSent = (id: number) => testDb().updateTable('orderSheets')
  .set({ status: 'sent', sentAt: new Date('2026-03-02T15:00:00Z') }).where('id', '=', id).execute()

const statusOf = async (id: number) =>
  (await testDb().selectFrom('orderSheets').select('status').where('id', '=', id).executeTakeFirstOrThrow()).status

describe('order sheet commands', () => {
  it('creates an empty sheet with a default title and its audit row', async () => {
    const actor = await coordinator()
    const sheet = await createOrderSheet(testDb(), actor, {})
    expect(sheet).toMatchObject({ title: 'Order sheet', status: 'draft', lines: [] })
    expect((await auditRows('order_sheet', sheet.id)).map((a) => a.action)).toEqual(['order.create'])
  })

  it('refuses a catalog line in another unit than the reagent, and keeps the stored lines', async () => {
    const { db, actor, sheet, line } = await draftWithLine('mL')
    const error = await refusal(updateOrderSheet(db, actor, sheet.id, { title: 'Renamed', lines: [{ ...line, unit: 'g' }] }))
    expect(error.statusMessage).toBe('lines.0.unit: This reagent is counted in mL')
    const stored = await db.selectFrom('orderSheets').select('title').where('id', '=', sheet.id).executeTakeFirstOrThrow()
    expect(stored.title).toBe('Spring restock')
    const lines = await db.selectFrom('orderLines').select(['unit', 'containers']).where('orderId', '=', sheet.id).execute()
    expect(lines).toEqual([{ unit: 'mL', containers: 2 }])
  })

  it('will not send a sheet whose line has no supplier e-mail: still a draft, no mail queued', async () => {
    const { db, actor, sheet } = await draftWithLine()
    const error = await refusal(sendOrderSheet(db, actor, sheet.id))
    expect(error.statusCode).toBe(422)
    expect(error.statusMessage).toMatch(/^lines\.0\.supplierEmail: Line 1 /)
    expect(await statusOf(sheet.id)).toBe('draft')
    const mail = await db.selectFrom('mailMessages').select('id').where('dedupeKey', 'like', `order:${sheet.id}:%`).execute()
    expect(mail).toEqual([])
  })

  it('receives a sent order: lots of containers × size, expiry by shelf life, the sheet closed', async () => {
    const { db, actor, reagent, sheet } = await draftWithLine('mL')
    await markSent(sheet.id)
    const lineId = sheet.lines[0]!.id

    const early = await refusal(receiveOrder(db, actor, sheet.id, { receivedOn: '2026-03-01', lines: [] }))
    expect(early.statusMessage).toBe('receivedOn: Before the order was sent')
    const wrongLine = await refusal(receiveOrder(db, actor, sheet.id, {
      receivedOn: '2026-03-05', lines: [{ lineId: lineId + 100_000, containers: 1, lotCode: '', location: '', expiresOn: null }],
    }))
    expect(wrongLine.statusMessage).toBe('lines.0.lineId: Not a line of this sheet')
    expect(await statusOf(sheet.id)).toBe('sent')
    expect(await db.selectFrom('reagentLots').select('id').where('reagentId', '=', reagent.id).execute()).toEqual([])

    const received = await receiveOrder(db, actor, sheet.id, {
      receivedOn: '2026-03-05', lines: [{ lineId, containers: 2, lotCode: 'R-7', location: 'Bay 1', expiresOn: null }],
    })
    expect(received.status).toBe('received')
    const lots = await db.selectFrom('reagentLots').select(['quantity', 'unit', 'expiresOn', 'orderLineId'])
      .where('reagentId', '=', reagent.id).execute()
    expect(lots).toEqual([{ quantity: 500, unit: 'mL', expiresOn: '2027-03-05', orderLineId: lineId }])
    const audit = await auditRows('order_sheet', sheet.id)
    expect(audit.at(-1)!.action).toBe('order.receive')
    // A received order is a record: it cannot be received again or thrown away.
    expect((await refusal(receiveOrder(db, actor, sheet.id, { receivedOn: '2026-03-06', lines: [] }))).statusCode).toBe(409)
    expect((await refusal(deleteOrderSheet(db, actor, sheet.id))).statusCode).toBe(409)
  })

  it('receives all or nothing: a line refused after another made its lot leaves no lot behind', async () => {
    const { db, actor, reagent, sheet, line } = await draftWithLine('mL')
    // A second reagent in mL without a density, whose unit changes to g after the sheet was written
    // (allowed while it has no stock): its line can no longer be put in the reagent's unit.
    const other = await createReagent(db, actor, reagentInput({ unit: 'mL', physicalState: 'liquid', density: null }))
    const withTwo = await updateOrderSheet(db, actor, sheet.id, { lines: [line, { ...line, reagentId: other.id, name: other.name }] })
    await db.updateTable('reagents').set({ unit: 'g' }).where('id', '=', other.id).execute()
    await markSent(sheet.id)
    const lines = withTwo.lines.map((l) => ({ lineId: l.id, containers: 1, lotCode: '', location: '', expiresOn: null }))
    const error = await refusal(receiveOrder(db, actor, sheet.id, { receivedOn: '2026-03-05', lines }))
    expect(error.statusMessage).toMatch(/^unit: /)
    expect(await db.selectFrom('reagentLots').select('id').where('reagentId', 'in', [reagent.id, other.id]).execute()).toEqual([])
    expect(await statusOf(sheet.id)).toBe('sent')
    expect((await auditRows('order_sheet', sheet.id)).map((a) => a.action)).not.toContain('order.receive')
  })

  it('a part delivery leaves the rest open; closing the rest needs a sent sheet and keeps the reason', async () => {
    const { db, actor, sheet } = await draftWithLine('mL')
    await markSent(sheet.id)
    const lineId = sheet.lines[0]!.id
    const part = await receiveOrder(db, actor, sheet.id, {
      receivedOn: '2026-03-05', lines: [{ lineId, containers: 1, lotCode: 'P-1', location: '', expiresOn: null }],
    })
    expect(part).toMatchObject({ status: 'sent', partlyReceived: true, receivedOn: null })
    expect(part.lines[0]).toMatchObject({ received: 1, open: 1 })
    const over = await refusal(receiveOrder(db, actor, sheet.id, {
      receivedOn: '2026-03-06', lines: [{ lineId, containers: 2, lotCode: '', location: '', expiresOn: null }],
    }))
    expect(over.statusMessage).toBe('lines.0.containers: At most 1 still open on this line')
    const closed = await closeOrderRest(db, actor, sheet.id, { reason: 'Back-ordered until June' })
    expect(closed).toMatchObject({ status: 'received', closedReason: 'Back-ordered until June', receivedOn: '2026-03-05' })
    expect(closed.lines[0]).toMatchObject({ received: 1, open: 0 })
    expect((await auditRows('order_sheet', sheet.id)).map((a) => a.action).slice(-2)).toEqual(['order.receive', 'order.close'])
    expect((await refusal(closeOrderRest(db, actor, sheet.id, { reason: 'again' }))).statusCode).toBe(409)
  })

  it('throws away a draft with its lines, and audits it', async () => {
    const { db, actor, sheet } = await draftWithLine()
    await deleteOrderSheet(db, actor, sheet.id)
    expect(await db.selectFrom('orderSheets').select('id').where('id', '=', sheet.id).executeTakeFirst()).toBeUndefined()
    expect(await db.selectFrom('orderLines').select('id').where('orderId', '=', sheet.id).execute()).toEqual([])
    expect((await auditRows('order_sheet', sheet.id)).map((a) => a.action)).toEqual(['order.create', 'order.update', 'order.delete'])
  })
})
