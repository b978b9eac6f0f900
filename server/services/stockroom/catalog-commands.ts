import type { Kysely } from 'kysely'
import type { z } from 'zod'
import { createError } from 'h3'
import type { Database } from '../../database/schema'
import type { Reagent } from '../../database/schema-stockroom'
import {
  reagentRuleIssues, type itemLinkInputSchema, type linkDismissSchema, type reagentInputSchema, type reagentPatchSchema,
} from '#shared/types/stockroom'
import { audit, type Actor } from '../../utils/audit'
import { invalid } from '../../utils/validation'
import { reagentFields, reagentIdentity, refuseDuplicateReagentName, requireReagent } from './catalog'

// Writes to the catalog and to the links between practicals' items and reagents. Each runs in one
// transaction with its audit row; a refusal leaves nothing written.

export async function createReagent(db: Kysely<Database>, actor: Actor, input: z.output<typeof reagentInputSchema>): Promise<Reagent> {
  const values = { ...input, ...(await reagentIdentity(input)) }
  await refuseDuplicateReagentName(db, values.name)
  return db.transaction().execute(async (trx) => {
    const created = await trx.insertInto('reagents').values(values).returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor, { action: 'reagent.create', entity: 'reagent', entityId: created.id, after: values })
    return created
  })
}

/** A change to a reagent; its unit stays while it has lots (their quantities are in that unit). */
export async function updateReagent(
  db: Kysely<Database>, actor: Actor, id: number, input: z.output<typeof reagentPatchSchema>,
): Promise<Reagent> {
  const before = await requireReagent(db, id)
  const merged = { ...reagentFields(before), ...input }
  const issues = reagentRuleIssues(merged)
  if (issues.length) invalid(issues)
  const identity = 'smiles' in input || 'formula' in input || 'molarMass' in input ? await reagentIdentity(merged) : {}
  if (input.name !== undefined && input.name.toLowerCase() !== before.name.toLowerCase()) await refuseDuplicateReagentName(db, input.name)
  return db.transaction().execute(async (trx) => {
    if (input.unit && input.unit !== before.unit) {
      const lots = await trx.selectFrom('reagentLots').select('id').where('reagentId', '=', id).limit(1).execute()
      if (lots.length) {
        const why = `unit: its lots are counted in ${before.unit}; the unit cannot change while it has stock`
        throw createError({ statusCode: 409, statusMessage: why })
      }
    }
    const updated = await trx.updateTable('reagents').set({ ...input, ...identity, updatedAt: new Date() })
      .where('id', '=', id).returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor, {
      action: 'reagent.update', entity: 'reagent', entityId: id, before: reagentFields(before), after: reagentFields(updated),
    })
    return updated
  })
}

/** Only a reagent nothing refers to: stock and practicals keep their history otherwise. */
export async function deleteReagent(db: Kysely<Database>, actor: Actor, id: number): Promise<void> {
  const reagent = await requireReagent(db, id)
  await db.transaction().execute(async (trx) => {
    const lots = await trx.selectFrom('reagentLots').select('id').where('reagentId', '=', id).limit(1).execute()
    const items = await trx.selectFrom('practicalItems').select('id').where('reagentId', '=', id).limit(1).execute()
    if (lots.length || items.length) {
      const why = lots.length
        ? 'This reagent has stock lots; it stays in the catalog'
        : 'Practicals draw on this reagent; unlink their items first'
      throw createError({ statusCode: 409, statusMessage: why })
    }
    await trx.deleteFrom('reagents').where('id', '=', id).execute()
    await audit(trx, actor, { action: 'reagent.delete', entity: 'reagent', entityId: id, before: reagentFields(reagent) })
  })
}

/**
 * Which catalog reagent a practical's item draws on (the stockroom's side of the procedure). A
 * strength in % w/v makes the item a solution made up with water from the reagent: only for an
 * item measured in mL, of a solid counted in g. Unlinking clears the strength.
 */
export async function linkItemToReagent(db: Kysely<Database>, actor: Actor, itemId: number, input: z.output<typeof itemLinkInputSchema>) {
  const item = await db.selectFrom('practicalItems').select(['id', 'basis', 'reagentId', 'solutionPercentWv'])
    .where('id', '=', itemId).executeTakeFirst()
  if (!item) throw createError({ statusCode: 404, statusMessage: 'Practical item not found' })
  if (input.reagentId !== null) {
    const reagent = await requireReagent(db, input.reagentId)
      .catch(() => invalid([{ field: 'reagentId', message: 'Not a reagent in the catalog' }]))
    if (input.percentWv !== null && (reagent.physicalState !== 'solid' || reagent.unit !== 'g')) {
      invalid([{ field: 'reagentId', message: 'A solution in % w/v is made up from a solid reagent counted in g' }])
    }
  }
  if (input.percentWv !== null && item.basis !== 'mL') {
    invalid([{ field: 'percentWv', message: 'Only an item measured in mL can be a solution made up from the reagent' }])
  }
  const after = { reagentId: input.reagentId, solutionPercentWv: input.reagentId === null ? null : input.percentWv }
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('practicalItems').set(after).where('id', '=', itemId).execute()
    const before = { reagentId: item.reagentId, solutionPercentWv: item.solutionPercentWv }
    await audit(trx, actor, { action: 'practical_item.reagent', entity: 'practical_item', entityId: itemId, before, after })
  })
  return { practicalItemId: itemId, ...after }
}

/** A proposed link the coordinator says is wrong: remembered, so the forecast proposes it no more. */
export async function dismissItemLink(db: Kysely<Database>, actor: Actor, itemId: number, input: z.output<typeof linkDismissSchema>) {
  const item = await db.selectFrom('practicalItems').select('id').where('id', '=', itemId).executeTakeFirst()
  if (!item) throw createError({ statusCode: 404, statusMessage: 'Practical item not found' })
  await requireReagent(db, input.reagentId).catch(() => invalid([{ field: 'reagentId', message: 'Not a reagent in the catalog' }]))
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('itemLinkDismissals').values({ practicalItemId: itemId, reagentId: input.reagentId, dismissedBy: actor.id })
      .onConflict((oc) => oc.columns(['practicalItemId', 'reagentId']).doNothing()).execute()
    await audit(trx, actor, { action: 'practical_item.dismiss_link', entity: 'practical_item', entityId: itemId, after: input })
  })
  return { practicalItemId: itemId, dismissedReagentId: input.reagentId }
}
