import { orderCreateSchema, type OrderDetail } from '#shared/types/stockroom'

// A new sheet: from the forecast's shortfalls for a range (one line per reagent, whole
// containers, the catalog's supplier), or empty for articles outside the forecast.
export default defineEventHandler(async (event): Promise<OrderDetail> => {
  const me = requireStockroomManager(event)
  const input = await readBodyAs(event, orderCreateSchema)
  let lines: Awaited<ReturnType<typeof linesFromShortfalls>> = []
  if (input.from && input.to) {
    const forecast = await loadForecast(me, { from: input.from, to: input.to })
    lines = linesFromShortfalls(forecast.lines, await useDb().selectFrom('reagents').selectAll().execute())
    if (!lines.length) throw createError({ statusCode: 409, statusMessage: 'Nothing is short in this range: there is nothing to order' })
  }
  const title = input.title || (input.from ? `Stock for ${input.from} to ${input.to}` : 'Order sheet')
  const id = await useDb().transaction().execute(async (trx) => {
    const sheet = await trx.insertInto('orderSheets').values({ title, forecastFrom: input.from ?? null, forecastTo: input.to ?? null, createdBy: me.id }).returning('id').executeTakeFirstOrThrow()
    await writeOrderLines(trx, sheet.id, lines)
    await audit(trx, event, { action: 'order.create', entity: 'order_sheet', entityId: sheet.id, after: { title, from: input.from, to: input.to, lines } })
    return sheet.id
  })
  setResponseStatus(event, 201)
  return orderSheetDetail(id)
})
