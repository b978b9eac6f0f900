import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'

/** Whether the person gets the daily summary (only TAs are sent one; the choice is everyone's own). */
export async function dailySummaryChoice(db: Kysely<Database>, userId: number): Promise<{ dailySummary: boolean }> {
  const row = await db.selectFrom('users').select('dailySummary').where('id', '=', userId).executeTakeFirstOrThrow()
  return { dailySummary: row.dailySummary }
}

/** The person's own choice, with its audit row. */
export async function setDailySummary(db: Kysely<Database>, actor: Actor, dailySummary: boolean) {
  return db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('users').select('dailySummary').where('id', '=', actor.id).forUpdate().executeTakeFirstOrThrow()
    await trx.updateTable('users').set({ dailySummary, updatedAt: new Date() }).where('id', '=', actor.id).execute()
    await audit(trx, actor, {
      action: 'account.daily-summary', entity: 'user', entityId: actor.id,
      before: { dailySummary: before.dailySummary }, after: { dailySummary },
    })
    return { dailySummary }
  })
}
