import type { Kysely } from 'kysely'
import type { z } from 'zod'
import type { Database } from '../../database/schema'
import type { LotView, lotInputSchema, lotPatchSchema, usageInputSchema } from '#shared/types/stockroom'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import { requireReagent, stockQuantityIn } from './catalog'
import { requireLot, shelfLifeExpiry } from './lots'

// Writes to lots: stock that arrives outside an order sheet, changes to a lot, what was taken from
// one. Each runs in one transaction with its audit row; a refusal leaves nothing written.

/**
 * Stock that arrives outside an order sheet (a stocktake, a transfer). Quantities are kept in the
 * reagent's unit; a lot given in the other one is converted through the reagent's density.
 */
export async function addLot(
  db: Kysely<Database>, actor: Actor, reagentId: number, input: z.output<typeof lotInputSchema>,
): Promise<LotView> {
  const reagent = await requireReagent(db, reagentId)
  const quantity = stockQuantityIn(reagent, input.quantity, input.unit)
  const lot = await db.transaction().execute(async (trx) => {
    const created = await trx.insertInto('reagentLots').values({
      reagentId, lotCode: input.lotCode, quantity, unit: reagent.unit, containers: input.containers, location: input.location,
      receivedOn: input.receivedOn, openedOn: input.openedOn, createdBy: actor.id,
      expiresOn: shelfLifeExpiry(reagent, input.receivedOn, input.expiresOn),
    }).returning('id').executeTakeFirstOrThrow()
    const after = { reagentId, ...input, quantity, unit: reagent.unit }
    await audit(trx, actor, { action: 'lot.create', entity: 'reagent_lot', entityId: created.id, after })
    return created
  })
  return (await requireLot(db, lot.id)).view
}

/** A lot's code, place and dates; it cannot be opened or expire before it was received. */
export async function updateLot(db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof lotPatchSchema>): Promise<LotView> {
  const { row } = await requireLot(db, id)
  const openedOn = input.openedOn === undefined ? row.openedOn : input.openedOn
  const expiresOn = input.expiresOn === undefined ? row.expiresOn : input.expiresOn
  if (openedOn && openedOn < row.receivedOn) invalid([{ field: 'openedOn', message: 'Opened before it was received?' }])
  if (expiresOn && expiresOn < row.receivedOn) invalid([{ field: 'expiresOn', message: 'The expiry is before the received date' }])
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('reagentLots').set({ ...input, updatedAt: new Date() }).where('id', '=', id).execute()
    const before = { lotCode: row.lotCode, location: row.location, openedOn: row.openedOn, expiresOn: row.expiresOn }
    await audit(trx, actor, { action: 'lot.update', entity: 'reagent_lot', entityId: id, before, after: input })
  })
  return (await requireLot(db, id)).view
}

/**
 * What was taken from a lot. The lot row is locked so two entries cannot both take the last of
 * it; the first use also marks the lot opened.
 */
export async function recordUsage(
  db: Kysely<Database>, actor: Actor, lotId: number, input: z.output<typeof usageInputSchema>,
): Promise<LotView> {
  await requireLot(db, lotId)
  if (input.practicalId !== null) {
    const practical = await db.selectFrom('practicals').select('id').where('id', '=', input.practicalId).executeTakeFirst()
    if (!practical) invalid([{ field: 'practicalId', message: 'No such practical' }])
  }
  await db.transaction().execute(async (trx) => {
    const lot = await trx.selectFrom('reagentLots').selectAll().where('id', '=', lotId).forUpdate().executeTakeFirstOrThrow()
    const used = await trx.selectFrom('reagentUsage').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('amount'), eb.val(0)).as('total'))
      .where('lotId', '=', lotId).executeTakeFirstOrThrow()
    const left = lot.quantity - Number(used.total)
    if (input.amount > left + 1e-9) {
      invalid([{ field: 'amount', message: `More than the lot holds (${Math.round(left * 1000) / 1000} ${lot.unit} left)` }], 422)
    }
    if (input.usedOn < lot.receivedOn) invalid([{ field: 'usedOn', message: 'Before the lot was received' }])
    const created = await trx.insertInto('reagentUsage').values({
      lotId, usedOn: input.usedOn, amount: input.amount, note: input.note, practicalId: input.practicalId, recordedBy: actor.id,
    }).returning('id').executeTakeFirstOrThrow()
    if (!lot.openedOn) {
      await trx.updateTable('reagentLots').set({ openedOn: input.usedOn, updatedAt: new Date() }).where('id', '=', lotId).execute()
    }
    const after = { usageId: created.id, ...input, unit: lot.unit }
    await audit(trx, actor, { action: 'lot.use', entity: 'reagent_lot', entityId: lotId, after })
  })
  return (await requireLot(db, lotId)).view
}
