import type { Kysely } from 'kysely'
import type { z } from 'zod'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { orderCreateSchema, OrderDetail, orderPatchSchema, receiveInputSchema } from '#shared/types/stockroom'
import { isoDateOf } from '#shared/utils/dates'
import { audit, type Actor } from '../../utils/audit'
import { queueMail } from '../../utils/mail'
import { invalid } from '../../utils/validation'
import { stockQuantityIn } from './catalog'
import { loadForecast } from './forecast'
import { shelfLifeExpiry } from './lots'
import { checkedOrderLines, linesFromShortfalls, orderSheetDetail, requireOrderSheet, writeOrderLines } from './orders'
import { purchaseRequestMail, purchaseRequests } from './purchase-requests'

// Writes to order sheets: create, change, send, receive, throw away. Each runs in one transaction
// with its audit row, and checks the sheet's status again under a lock inside it.

/**
 * A new sheet: from the forecast's shortfalls for a range (one line per reagent, whole
 * containers, the catalog's supplier), or empty for articles outside the forecast.
 */
export async function createOrderSheet(
  db: Kysely<Database>, actor: Actor, input: z.output<typeof orderCreateSchema>,
): Promise<OrderDetail> {
  let lines: ReturnType<typeof linesFromShortfalls> = []
  if (input.from && input.to) {
    const forecast = await loadForecast(db, actor, { from: input.from, to: input.to })
    lines = linesFromShortfalls(forecast.lines, await db.selectFrom('reagents').selectAll().execute())
    if (!lines.length) throw createError({ statusCode: 409, statusMessage: 'Nothing is short in this range: there is nothing to order' })
  }
  const title = input.title || (input.from ? `Stock for ${input.from} to ${input.to}` : 'Order sheet')
  const id = await db.transaction().execute(async (trx) => {
    const sheet = await trx.insertInto('orderSheets')
      .values({ title, forecastFrom: input.from ?? null, forecastTo: input.to ?? null, createdBy: actor.id })
      .returning('id').executeTakeFirstOrThrow()
    await writeOrderLines(trx, sheet.id, lines)
    const after = { title, from: input.from, to: input.to, lines }
    await audit(trx, actor, { action: 'order.create', entity: 'order_sheet', entityId: sheet.id, after })
    return sheet.id
  })
  return orderSheetDetail(db, id)
}

/** A sheet being prepared: its title, notes and lines (the list replaces the stored one). */
export async function updateOrderSheet(
  db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof orderPatchSchema>,
): Promise<OrderDetail> {
  await requireOrderSheet(db, id, 'draft')
  const lines = input.lines ? await checkedOrderLines(db, input.lines) : undefined
  await db.transaction().execute(async (trx) => {
    const sheet = await requireOrderSheet(trx, id, 'draft')
    const storedLines = await trx.selectFrom('orderLines').selectAll().where('orderId', '=', id).orderBy('position').execute()
    const before = { title: sheet.title, notes: sheet.notes, lines: storedLines }
    await trx.updateTable('orderSheets').set({ title: input.title, notes: input.notes, updatedAt: new Date() })
      .where('id', '=', id).execute()
    if (lines) await writeOrderLines(trx, id, lines)
    await audit(trx, actor, { action: 'order.update', entity: 'order_sheet', entityId: id, before, after: input })
  })
  return orderSheetDetail(db, id)
}

export interface QueuedRequest {
  supplierEmail: string
  messageId: number
}

/**
 * One purchase request per supplier, queued in the same transaction that marks the sheet sent:
 * both or neither. The dedupe key (order and supplier) means a retry never mails twice.
 */
export async function sendOrderSheet(db: Kysely<Database>, actor: Actor, id: number): Promise<OrderDetail & { requests: QueuedRequest[] }> {
  await requireOrderSheet(db, id, 'draft')
  const detail = await orderSheetDetail(db, id)
  const requests = purchaseRequests(detail)
  const queued = await db.transaction().execute(async (trx) => {
    await requireOrderSheet(trx, id, 'draft')
    const out: QueuedRequest[] = []
    for (const request of requests) {
      const mail = purchaseRequestMail(detail, request, actor)
      const { id: messageId } = await queueMail(trx, {
        key: `order:${id}:${request.supplierEmail}`, kind: 'purchase-request', to: [request.supplierEmail], createdBy: actor.id, ...mail,
      })
      out.push({ supplierEmail: request.supplierEmail, messageId })
    }
    await trx.updateTable('orderSheets').set({ status: 'sent', sentAt: new Date(), sentBy: actor.id, updatedAt: new Date() })
      .where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.send', entity: 'order_sheet', entityId: id, after: { requests: out } })
    return out
  })
  return { ...(await orderSheetDetail(db, id)), requests: queued }
}

/**
 * The delivery came: one lot per catalog line that arrived (containers × size, the catalog's
 * shelf life unless an expiry is given), and the sheet is closed.
 */
export async function receiveOrder(
  db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof receiveInputSchema>,
): Promise<OrderDetail> {
  const sheet = await requireOrderSheet(db, id, 'sent')
  const lines = await db.selectFrom('orderLines').selectAll().where('orderId', '=', id).execute()
  const byId = new Map(lines.map((l) => [l.id, l]))
  input.lines.forEach((r, i) => {
    if (!byId.has(r.lineId)) invalid([{ field: `lines.${i}.lineId`, message: 'Not a line of this sheet' }])
    if (r.expiresOn && r.expiresOn < input.receivedOn) {
      invalid([{ field: `lines.${i}.expiresOn`, message: 'The expiry is before the received date' }])
    }
  })
  if (sheet.sentAt && input.receivedOn < isoDateOf(sheet.sentAt)) invalid([{ field: 'receivedOn', message: 'Before the order was sent' }])
  const reagentIds = [...new Set(lines.map((l) => l.reagentId).filter((r): r is number => r !== null))]
  const reagentRows = reagentIds.length ? await db.selectFrom('reagents').selectAll().where('id', 'in', reagentIds).execute() : []
  const reagents = new Map(reagentRows.map((r) => [r.id, r]))

  await db.transaction().execute(async (trx) => {
    await requireOrderSheet(trx, id, 'sent')
    const created: number[] = []
    for (const r of input.lines) {
      const line = byId.get(r.lineId)!
      const reagent = line.reagentId === null ? undefined : reagents.get(line.reagentId)
      // Articles outside the catalog, and counted ones ('each'), are not stock.
      if (!reagent || r.containers === 0 || line.unit === 'each') continue
      const lot = await trx.insertInto('reagentLots').values({
        reagentId: reagent.id, lotCode: r.lotCode, quantity: stockQuantityIn(reagent, r.containers * line.containerSize, line.unit),
        unit: reagent.unit, containers: r.containers, location: r.location, receivedOn: input.receivedOn, orderLineId: line.id,
        createdBy: actor.id, expiresOn: shelfLifeExpiry(reagent, input.receivedOn, r.expiresOn),
      }).returning('id').executeTakeFirstOrThrow()
      created.push(lot.id)
    }
    await trx.updateTable('orderSheets')
      .set({ status: 'received', receivedOn: input.receivedOn, receivedBy: actor.id, updatedAt: new Date() })
      .where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.receive', entity: 'order_sheet', entityId: id, after: { ...input, lots: created } })
  })
  return orderSheetDetail(db, id)
}

/** A sheet still being prepared can be thrown away; a requested one is a record of what was asked. */
export async function deleteOrderSheet(db: Kysely<Database>, actor: Actor, id: number): Promise<void> {
  await requireOrderSheet(db, id, 'draft')
  await db.transaction().execute(async (trx) => {
    const sheet = await requireOrderSheet(trx, id, 'draft')
    await trx.deleteFrom('orderSheets').where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.delete', entity: 'order_sheet', entityId: id, before: { title: sheet.title } })
  })
}
