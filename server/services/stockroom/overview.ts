import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import type { SessionUser } from '#shared/types/auth'
import type { StockroomOverview } from '#shared/types/stockroom'
import { addDays } from '#shared/utils/dates'
import { reagentListItems } from './catalog'
import { loadForecast } from './forecast'
import { lotRows, stockroomToday } from './lots'
import { orderSheetSummaries } from './orders'

/**
 * The coordinator's stockroom page: what is short in the next four weeks, what runs low or
 * expires within 30 days, and the order sheets in play (received ones for a week).
 */
export async function stockroomOverview(db: Kysely<Database>, me: SessionUser): Promise<StockroomOverview> {
  const today = stockroomToday()
  const to = addDays(today, 27)
  const forecast = await loadForecast(db, me, { from: today, to, today })
  const reagents = await reagentListItems(db, today)
  const lots = await lotRows(db).innerJoin('reagents', 'reagents.id', 'reagentLots.reagentId').select('reagents.name as reagentName')
    .where('reagentLots.expiresOn', '<=', addDays(today, 30)).orderBy('reagentLots.expiresOn').execute()
  const weekAgo = addDays(today, -7)
  const orders = (await orderSheetSummaries(db))
    .filter((o) => o.status !== 'received' || (o.receivedOn !== null && o.receivedOn >= weekAgo))
  return {
    from: today,
    to,
    shortfalls: forecast.lines.filter((l) => l.containers > 0),
    halogenatedWasteMl: forecast.halogenatedWasteMl,
    unlinkedItems: forecast.unlinkedItems.length,
    lowStock: reagents.filter((r) => r.low),
    expiring: lots.filter((l) => Number(l.remaining) > 0).map((l) => ({
      lotId: l.id, reagentId: l.reagentId, reagentName: l.reagentName, lotCode: l.lotCode, remaining: Number(l.remaining), unit: l.unit,
      expiresOn: l.expiresOn!, expired: l.expiresOn! < today, location: l.location,
    })),
    orders,
  }
}
