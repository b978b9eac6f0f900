import type { Kysely } from 'kysely'
import type { z } from 'zod'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { closeOrderSchema, orderCreateSchema, OrderDetail, orderPatchSchema, receiveInputSchema } from '#shared/types/stockroom'
import { isoDateOf } from '#shared/utils/dates'
import { audit, type Actor } from '../../utils/audit'
import { queueMail } from '../../utils/mail'
import { invalid } from '../../utils/validation'
import { stockQuantityIn } from './catalog'
import { loadForecast } from './forecast'
import { shelfLifeExpiry } from './lots'
import {
  checkedOrderLines, linesFromShortfalls, openContainers, orderSheetDetail, purchaseRequestKey, receivedByLine, requireOrderSheet,
  writeOrderLines,
} from './orders'
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
  let internalNotes = ''
  if (input.from && input.to) {
    const forecast = await loadForecast(db, actor, { from: input.from, to: input.to })
    const fromShortfalls = linesFromShortfalls(forecast.lines, await db.selectFrom('reagents').selectAll().execute())
    if (!fromShortfalls.length) {
      throw createError({ statusCode: 409, statusMessage: 'Nothing is short in this range: there is nothing to order' })
    }
    // Why each line is on the sheet is the stockroom's reasoning, not the supplier's business.
    internalNotes = fromShortfalls.map((l) => `${l.name}: ${l.note}`).join('\n')
    lines = fromShortfalls.map((l) => ({ ...l, note: '' }))
  }
  const title = input.title || (input.from ? `Stock for ${input.from} to ${input.to}` : 'Order sheet')
  const id = await db.transaction().execute(async (trx) => {
    const sheet = await trx.insertInto('orderSheets')
      .values({ title, internalNotes, forecastFrom: input.from ?? null, forecastTo: input.to ?? null, createdBy: actor.id })
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
    const before = { title: sheet.title, notes: sheet.notes, internalNotes: sheet.internalNotes, lines: storedLines }
    await trx.updateTable('orderSheets')
      .set({ title: input.title, notes: input.notes, internalNotes: input.internalNotes, updatedAt: new Date() })
      .where('id', '=', id).execute()
    if (lines) await writeOrderLines(trx, id, lines)
    await audit(trx, actor, { action: 'order.update', entity: 'order_sheet', entityId: id, before, after: input })
  })
  return orderSheetDetail(db, id)
}

/**
 * One purchase request per supplier, queued in the same transaction that marks the sheet sent:
 * both or neither. The dedupe key (order and supplier) means a retry never mails twice. Answers
 * go to the coordinator who sent it (Reply-To), who also gets a copy.
 */
export async function sendOrderSheet(db: Kysely<Database>, actor: Actor, id: number): Promise<OrderDetail> {
  await requireOrderSheet(db, id, 'draft')
  const detail = await orderSheetDetail(db, id)
  const requests = purchaseRequests(detail)
  const sender = await db.selectFrom('users').select(['name', 'email']).where('id', '=', actor.id).executeTakeFirstOrThrow()
  await db.transaction().execute(async (trx) => {
    await requireOrderSheet(trx, id, 'draft')
    const out: Array<{ supplierEmail: string, messageId: number }> = []
    for (const request of requests) {
      const mail = purchaseRequestMail(detail, request, sender)
      const { id: messageId } = await queueMail(trx, {
        key: purchaseRequestKey(id, request.supplierEmail), kind: 'purchase-request', to: [request.supplierEmail],
        replyTo: sender.email, cc: [sender.email], createdBy: actor.id, ...mail,
      })
      out.push({ supplierEmail: request.supplierEmail, messageId })
    }
    await trx.updateTable('orderSheets').set({ status: 'sent', sentAt: new Date(), sentBy: actor.id, updatedAt: new Date() })
      .where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.send', entity: 'order_sheet', entityId: id, after: { requests: out } })
  })
  return orderSheetDetail(db, id)
}

/**
 * A delivery came, perhaps only part of the order: a receipt per line that came (and a lot per
 * catalog line: containers × size, the catalog's shelf life unless an expiry is given). What did
 * not come stays open; the sheet is received once nothing is open.
 */
export async function receiveOrder(
  db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof receiveInputSchema>,
): Promise<OrderDetail> {
  const sheet = await requireOrderSheet(db, id, 'sent')
  if (sheet.sentAt && input.receivedOn < isoDateOf(sheet.sentAt)) invalid([{ field: 'receivedOn', message: 'Before the order was sent' }])
  input.lines.forEach((r, i) => {
    if (r.expiresOn && r.expiresOn < input.receivedOn) {
      invalid([{ field: `lines.${i}.expiresOn`, message: 'The expiry is before the received date' }])
    }
  })
  if (!input.lines.some((r) => r.containers > 0)) {
    invalid([{ field: 'lines', message: 'Enter how many containers came of at least one line' }])
  }
  const lineRows = await db.selectFrom('orderLines').select('reagentId').where('orderId', '=', id).execute()
  const reagentIds = [...new Set(lineRows.map((l) => l.reagentId).filter((r): r is number => r !== null))]
  const reagentRows = reagentIds.length ? await db.selectFrom('reagents').selectAll().where('id', 'in', reagentIds).execute() : []
  const reagents = new Map(reagentRows.map((r) => [r.id, r]))

  await db.transaction().execute(async (trx) => {
    const locked = await requireOrderSheet(trx, id, 'sent')
    // Read under the sheet's lock, so two deliveries entered at once cannot both fill the same line.
    const lines = await trx.selectFrom('orderLines').selectAll().where('orderId', '=', id).execute()
    const byId = new Map(lines.map((l) => [l.id, l]))
    const received = receivedByLine(await trx.selectFrom('orderReceipts').select(['orderLineId', 'containers'])
      .where('orderLineId', 'in', lines.map((l) => l.id)).execute())
    input.lines.forEach((r, i) => {
      const line = byId.get(r.lineId)
      if (!line) invalid([{ field: `lines.${i}.lineId`, message: 'Not a line of this sheet' }])
      const open = openContainers(locked, line, received)
      if (r.containers > open) invalid([{ field: `lines.${i}.containers`, message: `At most ${open} still open on this line` }])
    })
    const created: number[] = []
    for (const r of input.lines) {
      if (r.containers === 0) continue
      const line = byId.get(r.lineId)!
      const reagent = line.reagentId === null ? undefined : reagents.get(line.reagentId)
      let lotId: number | null = null
      // Articles outside the catalog, and counted ones ('each'), are not stock.
      if (reagent && line.unit !== 'each') {
        const lot = await trx.insertInto('reagentLots').values({
          reagentId: reagent.id, lotCode: r.lotCode, quantity: stockQuantityIn(reagent, r.containers * line.containerSize, line.unit),
          unit: reagent.unit, containers: r.containers, location: r.location, receivedOn: input.receivedOn, orderLineId: line.id,
          createdBy: actor.id, expiresOn: shelfLifeExpiry(reagent, input.receivedOn, r.expiresOn),
        }).returning('id').executeTakeFirstOrThrow()
        lotId = lot.id
        created.push(lot.id)
      }
      await trx.insertInto('orderReceipts').values({
        orderLineId: line.id, receivedOn: input.receivedOn, containers: r.containers, lotId, receivedBy: actor.id,
      }).execute()
      received.set(line.id, (received.get(line.id) ?? 0) + r.containers)
    }
    const complete = lines.every((l) => openContainers(locked, l, received) === 0)
    await trx.updateTable('orderSheets')
      .set(complete
        ? { status: 'received', receivedOn: input.receivedOn, receivedBy: actor.id, updatedAt: new Date() }
        : { updatedAt: new Date() })
      .where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.receive', entity: 'order_sheet', entityId: id, after: { ...input, lots: created, complete } })
  })
  return orderSheetDetail(db, id)
}

/**
 * What is still open will not come (out of stock, discontinued, bought elsewhere): the order is
 * closed as received with what did come, and the reason is kept on the sheet.
 */
export async function closeOrderRest(
  db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof closeOrderSchema>,
): Promise<OrderDetail> {
  await requireOrderSheet(db, id, 'sent')
  await db.transaction().execute(async (trx) => {
    const sheet = await requireOrderSheet(trx, id, 'sent')
    const lines = await trx.selectFrom('orderLines').selectAll().where('orderId', '=', id).execute()
    const receipts = lines.length
      ? await trx.selectFrom('orderReceipts').select(['orderLineId', 'containers', 'receivedOn'])
          .where('orderLineId', 'in', lines.map((l) => l.id)).execute()
      : []
    const received = receivedByLine(receipts)
    const open = lines.filter((l) => openContainers(sheet, l, received) > 0)
      .map((l) => ({ lineId: l.id, name: l.name, open: openContainers(sheet, l, received) }))
    const lastReceipt = receipts.map((r) => r.receivedOn).sort().at(-1) ?? null
    await trx.updateTable('orderSheets').set({
      status: 'received', closedReason: input.reason, closedAt: new Date(), closedBy: actor.id,
      receivedOn: lastReceipt, receivedBy: lastReceipt ? actor.id : null, updatedAt: new Date(),
    }).where('id', '=', id).execute()
    await audit(trx, actor, { action: 'order.close', entity: 'order_sheet', entityId: id, after: { reason: input.reason, open } })
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
