import { sql, type Kysely } from 'kysely'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { Reagent } from '../../database/schema-stockroom'
import type { LotView } from '#shared/types/stockroom'
import { addMonths, todayIn } from '#shared/utils/dates'

// Lots and what is left of them: the reads behind the lot routes, the catalog and the forecast.

/** The stockroom's calendar day (UTC): lots expire and meetings fall on calendar dates. */
export function stockroomToday(now = new Date()): string {
  return todayIn('UTC', now)
}

/** Lots with what is left of each (received quantity less the usage recorded against it). */
export function lotRows(db: Kysely<Database>) {
  const used = sql<number>`coalesce((select sum(u.amount) from reagent_usage u where u.lot_id = reagent_lots.id), 0)`
  return db.selectFrom('reagentLots').selectAll('reagentLots')
    .select(sql<number>`reagent_lots.quantity - ${used}`.as('remaining'))
    .select((eb) => eb.selectFrom('orderLines').select('orderLines.orderId')
      .whereRef('orderLines.id', '=', 'reagentLots.orderLineId').as('orderId'))
}

export type LotRow = Awaited<ReturnType<ReturnType<typeof lotRows>['execute']>>[number]

export function lotView(row: LotRow, today: string): LotView {
  return {
    id: row.id, lotCode: row.lotCode, quantity: row.quantity, remaining: Number(row.remaining), unit: row.unit, containers: row.containers,
    location: row.location, receivedOn: row.receivedOn, openedOn: row.openedOn, expiresOn: row.expiresOn,
    expired: row.expiresOn !== null && row.expiresOn < today, orderId: row.orderId ?? null,
  }
}

/** In-date and expired stock of a reagent, from its lots, in the reagent's unit. */
export function stockTotals(lots: LotView[]) {
  const inDate = lots.filter((l) => !l.expired).reduce((s, l) => s + Math.max(0, l.remaining), 0)
  const expired = lots.filter((l) => l.expired).reduce((s, l) => s + Math.max(0, l.remaining), 0)
  return { inDate: Math.round(inDate * 1000) / 1000, expired: Math.round(expired * 1000) / 1000 }
}

export const isLowStock = (inDate: number, level: number | null) => level !== null && inDate < level

/** A lot with what is left of it, or 404. */
export async function requireLot(db: Kysely<Database>, id: number, today = stockroomToday()) {
  const row = await lotRows(db).where('reagentLots.id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Lot not found' })
  return { row, view: lotView(row, today) }
}

/** A lot's expiry when none is given: the catalog's shelf life from the day it arrived, or none. */
export function shelfLifeExpiry(reagent: Pick<Reagent, 'shelfLifeMonths'>, receivedOn: string, given?: string | null): string | null {
  return given ?? (reagent.shelfLifeMonths ? addMonths(receivedOn, reagent.shelfLifeMonths) : null)
}
