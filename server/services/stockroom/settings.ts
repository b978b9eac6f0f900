import type { Kysely } from 'kysely'
import type { z } from 'zod'
import type { Database } from '../../database/schema'
import type { settingsInputSchema, StockroomSettings } from '#shared/types/stockroom'
import { audit, type Actor } from '../../utils/audit'

/** The rinse allowance per work unit until the coordinator sets one. */
export const DEFAULT_RINSE_ML_PER_UNIT = 10

export async function stockroomSettings(db: Kysely<Database>): Promise<StockroomSettings> {
  const row = await db.selectFrom('stockroomSettings').select(['rinseMlPerUnit', 'deliverTo']).where('id', '=', 1).executeTakeFirst()
  return { rinseMlPerUnit: row?.rinseMlPerUnit ?? DEFAULT_RINSE_ML_PER_UNIT, deliverTo: row?.deliverTo ?? '' }
}

/** The one settings row, created on first save. */
export async function saveStockroomSettings(db: Kysely<Database>, actor: Actor, input: z.output<typeof settingsInputSchema>) {
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('stockroomSettings').select(['rinseMlPerUnit', 'deliverTo'])
      .where('id', '=', 1).forUpdate().executeTakeFirst()
    await trx.insertInto('stockroomSettings').values({ id: 1, ...input, updatedAt: new Date() })
      .onConflict((oc) => oc.column('id').doUpdateSet({ ...input, updatedAt: new Date() })).execute()
    await audit(trx, actor, { action: 'stockroom.settings', entity: 'stockroom_settings', entityId: 1, before, after: input })
  })
  return stockroomSettings(db)
}
