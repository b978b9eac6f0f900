import { settingsInputSchema, type StockroomSettings } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<StockroomSettings> => {
  requireStockroomManager(event)
  const input = await readBodyAs(event, settingsInputSchema)
  await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('stockroomSettings').select(['rinseMlPerUnit', 'deliverTo']).where('id', '=', 1).forUpdate().executeTakeFirst()
    await trx.insertInto('stockroomSettings').values({ id: 1, ...input, updatedAt: new Date() })
      .onConflict((oc) => oc.column('id').doUpdateSet({ ...input, updatedAt: new Date() })).execute()
    await audit(trx, event, { action: 'stockroom.settings', entity: 'stockroom_settings', entityId: 1, before, after: input })
  })
  return stockroomSettings()
})
