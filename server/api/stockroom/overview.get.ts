import type { StockroomOverview } from '#shared/types/stockroom'
import { addDays } from '#shared/utils/dates'

// The coordinator's first screen: what is short in the next four weeks, what runs low or
// expires, and the order sheets in play.
export default defineEventHandler(async (event): Promise<StockroomOverview> => {
  const me = requireStockroomManager(event)
  const today = stockroomToday()
  const to = addDays(today, 27)
  const forecast = await loadForecast(me, { from: today, to, today })
  const reagents = await reagentListItems(today)
  const soon = addDays(today, 30)
  const lots = await lotRows().innerJoin('reagents', 'reagents.id', 'reagentLots.reagentId').select('reagents.name as reagentName')
    .where('reagentLots.expiresOn', '<=', soon).orderBy('reagentLots.expiresOn').execute()
  const weekAgo = addDays(today, -7)
  const orders = (await orderSheetSummaries())
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
})
