import type { Kysely, Transaction } from 'kysely'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { OrderLine, OrderReceipt, OrderSheet, Reagent } from '../../database/schema-stockroom'
import type { HazardKey } from '#shared/data/cautions'
import { toSafeCsv } from '#shared/utils/csv-safe'
import { displayWeekOf } from '#shared/utils/date-display'
import {
  formatStock, type ForecastLine, type OrderDetail, type OrderLineInput, type OrderLineView, type OrderStatusName, type OrderSummary,
} from '#shared/types/stockroom'
import { invalid } from '../../utils/validation'
import { stockroomSettings } from './settings'

// Order sheets: drafts made from the forecast, their lines and the CSV.

const WRONG_STATUS: Record<OrderStatusName, string> = {
  draft: 'Only a sheet being prepared can be changed or sent',
  sent: 'Only a requested order still waiting for lines can be received or closed',
  received: 'This order has not been received',
}

/**
 * An order sheet, or 404; 409 when it is not in the status asked for. Inside a write (a
 * transaction), the sheet is locked so two sends (or a send and an edit) cannot interleave.
 */
export async function requireOrderSheet(db: Kysely<Database>, id: number, status?: OrderStatusName): Promise<OrderSheet> {
  let query = db.selectFrom('orderSheets').selectAll().where('id', '=', id)
  if (db.isTransaction) query = query.forUpdate()
  const row = await query.executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Order sheet not found' })
  if (status && row.status !== status) {
    throw createError({ statusCode: 409, statusMessage: `${WRONG_STATUS[status]} (this one is ${row.status})` })
  }
  return row
}

async function userNames(db: Kysely<Database>, ids: Array<number | null>) {
  const wanted = [...new Set(ids.filter((id): id is number => id !== null))]
  if (!wanted.length) return new Map<number, string>()
  const rows = await db.selectFrom('users').select(['id', 'name']).where('id', 'in', wanted).execute()
  return new Map(rows.map((r) => [r.id, r.name]))
}

/** Containers of each line delivered so far. */
export function receivedByLine(receipts: Pick<OrderReceipt, 'orderLineId' | 'containers'>[]): Map<number, number> {
  const out = new Map<number, number>()
  for (const r of receipts) out.set(r.orderLineId, (out.get(r.orderLineId) ?? 0) + r.containers)
  return out
}

/** A line's containers still to come; none once the sheet is received or its rest closed. */
export function openContainers(
  sheet: Pick<OrderSheet, 'status'>, line: Pick<OrderLine, 'id' | 'containers'>, received: Map<number, number>,
) {
  return sheet.status === 'sent' ? Math.max(0, line.containers - (received.get(line.id) ?? 0)) : 0
}

function lineView(
  sheet: OrderSheet, line: OrderLine, reagents: Map<number, Pick<Reagent, 'hazards'>>, received: Map<number, number>,
): OrderLineView {
  return {
    id: line.id, position: line.position, reagentId: line.reagentId, name: line.name, supplierName: line.supplierName,
    supplierEmail: line.supplierEmail, catalogNumber: line.catalogNumber, containers: line.containers, containerSize: line.containerSize,
    unit: line.unit, note: line.note, hazards: (line.reagentId !== null ? reagents.get(line.reagentId)?.hazards ?? [] : []) as HazardKey[],
    received: received.get(line.id) ?? 0, open: openContainers(sheet, line, received),
  }
}

const supplierLabel = (l: Pick<OrderLine, 'supplierName' | 'supplierEmail'>) => l.supplierName || l.supplierEmail || 'No supplier'

async function receiptsOf(db: Kysely<Database>, lineIds: number[]): Promise<OrderReceipt[]> {
  if (!lineIds.length) return []
  return db.selectFrom('orderReceipts').selectAll().where('orderLineId', 'in', lineIds).orderBy('receivedOn').orderBy('id').execute()
}

function summaryOf(sheet: OrderSheet, lines: OrderLine[], receipts: OrderReceipt[]): OrderSummary {
  const ids = new Set(lines.map((l) => l.id))
  return {
    partlyReceived: sheet.status === 'sent' && receipts.some((r) => ids.has(r.orderLineId)),
    id: sheet.id, title: sheet.title, status: sheet.status, lineCount: lines.length,
    suppliers: [...new Set(lines.map(supplierLabel))].sort(),
    forecastFrom: sheet.forecastFrom, forecastTo: sheet.forecastTo, createdAt: sheet.createdAt.toISOString(),
    sentAt: sheet.sentAt?.toISOString() ?? null, receivedOn: sheet.receivedOn,
  }
}

export async function orderSheetSummaries(db: Kysely<Database>): Promise<OrderSummary[]> {
  const sheets = await db.selectFrom('orderSheets').selectAll().orderBy('createdAt', 'desc').orderBy('id', 'desc').execute()
  const lines = sheets.length ? await db.selectFrom('orderLines').selectAll().where('orderId', 'in', sheets.map((s) => s.id)).execute() : []
  const receipts = await receiptsOf(db, lines.filter((l) => sheets.some((s) => s.id === l.orderId && s.status === 'sent')).map((l) => l.id))
  return sheets.map((s) => summaryOf(s, lines.filter((l) => l.orderId === s.id), receipts))
}

export async function orderSheetDetail(db: Kysely<Database>, id: number): Promise<OrderDetail> {
  const sheet = await requireOrderSheet(db, id)
  const lines = await db.selectFrom('orderLines').selectAll().where('orderId', '=', id).orderBy('position').execute()
  const reagentIds = [...new Set(lines.map((l) => l.reagentId).filter((r): r is number => r !== null))]
  const reagentRows = reagentIds.length
    ? await db.selectFrom('reagents').select(['id', 'hazards']).where('id', 'in', reagentIds).execute()
    : []
  const reagents = new Map(reagentRows.map((r) => [r.id, r]))
  const lots = lines.length
    ? await db.selectFrom('reagentLots').select(['id', 'reagentId', 'orderLineId', 'quantity', 'unit'])
        .where('orderLineId', 'in', lines.map((l) => l.id)).execute()
    : []
  const receipts = await receiptsOf(db, lines.map((l) => l.id))
  const received = receivedByLine(receipts)
  const names = await userNames(db, [sheet.createdBy, sheet.sentBy, sheet.receivedBy, sheet.closedBy, ...receipts.map((r) => r.receivedBy)])
  const name = (uid: number | null) => (uid === null ? null : names.get(uid) ?? null)
  return {
    ...summaryOf(sheet, lines, receipts),
    notes: sheet.notes,
    internalNotes: sheet.internalNotes,
    lines: lines.map((l) => lineView(sheet, l, reagents, received)),
    receipts: receipts.map((r) => ({
      id: r.id, lineId: r.orderLineId, receivedOn: r.receivedOn, containers: r.containers, lotId: r.lotId, receivedBy: name(r.receivedBy),
    })),
    closedReason: sheet.closedReason,
    closedAt: sheet.closedAt?.toISOString() ?? null,
    closedBy: name(sheet.closedBy),
    requests: await requestRecords(db, sheet, lines),
    createdBy: name(sheet.createdBy),
    sentBy: name(sheet.sentBy),
    receivedBy: name(sheet.receivedBy),
    lots: lots.map((l) => ({ id: l.id, reagentId: l.reagentId, lineId: l.orderLineId, quantity: l.quantity, unit: l.unit })),
    deliverTo: (await stockroomSettings(db)).deliverTo,
  }
}

/** Each supplier's purchase request of a sent sheet, with its message's state in the outbox. */
async function requestRecords(db: Kysely<Database>, sheet: OrderSheet, lines: OrderLine[]): Promise<OrderDetail['requests']> {
  if (sheet.status === 'draft') return []
  const bySupplier = new Map<string, { supplierName: string, lineCount: number }>()
  for (const l of lines) {
    if (!l.supplierEmail) continue
    const entry = bySupplier.get(l.supplierEmail) ?? { supplierName: l.supplierName, lineCount: 0 }
    entry.lineCount += 1
    bySupplier.set(l.supplierEmail, entry)
  }
  const keys = [...bySupplier.keys()].map((email) => purchaseRequestKey(sheet.id, email))
  const messages = keys.length
    ? await db.selectFrom('mailMessages').select(['dedupeKey', 'status', 'sentAt']).where('dedupeKey', 'in', keys).execute()
    : []
  const byKey = new Map(messages.map((m) => [m.dedupeKey, m]))
  return [...bySupplier].map(([supplierEmail, entry]) => {
    const message = byKey.get(purchaseRequestKey(sheet.id, supplierEmail))
    return { supplierEmail, ...entry, status: message?.status ?? null, sentAt: message?.sentAt?.toISOString() ?? null }
  })
}

/** The exactly-once key of one supplier's purchase request. */
export const purchaseRequestKey = (orderId: number, supplierEmail: string) => `order:${orderId}:${supplierEmail}`

/** One line per reagent short in the forecast: whole containers, the catalog's supplier. */
export function linesFromShortfalls(lines: ForecastLine[], reagents: Reagent[]): OrderLineInput[] {
  const byId = new Map(reagents.map((r) => [r.id, r]))
  return lines.filter((l) => l.containers > 0).map((l) => {
    const r = byId.get(l.reagentId)!
    return {
      reagentId: r.id, name: r.name, supplierName: r.supplierName, supplierEmail: r.supplierEmail, catalogNumber: r.catalogNumber,
      containers: l.containers, containerSize: r.containerSize, unit: r.unit,
      note: `Short by ${formatStock(l.shortfall, l.unit)} for ${l.weeks.length === 1 ? '' : `${l.weeks.length} weeks from `}`
        + `the ${displayWeekOf(l.weeks[0]!.week)}`,
    }
  })
}

/** A line as written: the catalog's copy of name, supplier and container, or typed. */
type StoredLine = Pick<OrderLine, 'name' | 'containers' | 'containerSize' | 'unit'>
  & Partial<Pick<OrderLine, 'reagentId' | 'supplierName' | 'supplierEmail' | 'catalogNumber' | 'note'>>

/**
 * Lines as they will be stored. A catalog line keeps the reagent's unit, so receiving it adds
 * stock in the unit the reagent is counted in.
 */
export async function checkedOrderLines<L extends StoredLine>(db: Kysely<Database>, lines: L[]): Promise<L[]> {
  const ids = [...new Set(lines.map((l) => l.reagentId).filter((id): id is number => typeof id === 'number'))]
  const rows = ids.length ? await db.selectFrom('reagents').select(['id', 'unit']).where('id', 'in', ids).execute() : []
  const reagents = new Map(rows.map((r) => [r.id, r]))
  lines.forEach((l, i) => {
    if (l.reagentId == null) return
    const reagent = reagents.get(l.reagentId)
    if (!reagent) invalid([{ field: `lines.${i}.reagentId`, message: 'Not a reagent in the catalog' }])
    if (reagent.unit !== l.unit) invalid([{ field: `lines.${i}.unit`, message: `This reagent is counted in ${reagent.unit}` }])
  })
  return lines
}

/** The sheet's lines replaced by these, in this order. */
export async function writeOrderLines(trx: Transaction<Database>, orderId: number, lines: StoredLine[]) {
  await trx.deleteFrom('orderLines').where('orderId', '=', orderId).execute()
  if (!lines.length) return
  await trx.insertInto('orderLines').values(lines.map((l, position) => ({
    orderId, position, reagentId: l.reagentId ?? null, name: l.name, supplierName: l.supplierName ?? '',
    supplierEmail: l.supplierEmail ?? null,
    catalogNumber: l.catalogNumber ?? '', containers: l.containers, containerSize: l.containerSize, unit: l.unit, note: l.note ?? '',
  }))).execute()
}

const CSV_HEADER = [
  'Line', 'Item', 'Supplier', 'Supplier e-mail', 'Catalogue number', 'Containers', 'Container size', 'Unit', 'Total', 'Note',
]

/** The sheet as CSV for a spreadsheet (OWASP-safe cells), optionally one supplier's lines only. */
export function orderSheetCsv(lines: OrderLineView[]): string {
  return toSafeCsv(CSV_HEADER, lines.map((l, i) => [
    i + 1, l.name, l.supplierName, l.supplierEmail ?? '', l.catalogNumber, l.containers, l.containerSize, l.unit,
    Math.round(l.containers * l.containerSize * 1000) / 1000, l.note,
  ]))
}
