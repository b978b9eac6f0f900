import { idParamsSchema } from '#shared/types/fields'
import { reagentPatchSchema, reagentRuleIssues, type ReagentDetail } from '#shared/types/stockroom'

export default defineEventHandler(async (event): Promise<ReagentDetail> => {
  const me = requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const before = await requireReagent(id)
  const input = await readBodyAs(event, reagentPatchSchema)
  const merged = { ...reagentFields(before), ...input }
  const issues = reagentRuleIssues(merged)
  if (issues.length) invalid(issues)
  const identity = 'smiles' in input || 'formula' in input || 'molarMass' in input ? await reagentIdentity(merged) : {}
  if (input.name !== undefined && input.name.toLowerCase() !== before.name.toLowerCase()) await refuseDuplicateReagentName(input.name)
  const row = await useDb().transaction().execute(async (trx) => {
    if (input.unit && input.unit !== before.unit) {
      const lots = await trx.selectFrom('reagentLots').select('id').where('reagentId', '=', id).limit(1).execute()
      if (lots.length) throw createError({ statusCode: 409, statusMessage: `unit: its lots are counted in ${before.unit}; the unit cannot change while it has stock` })
    }
    const updated = await trx.updateTable('reagents').set({ ...input, ...identity, updatedAt: new Date() }).where('id', '=', id).returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { action: 'reagent.update', entity: 'reagent', entityId: id, before: reagentFields(before), after: reagentFields(updated) })
    return updated
  })
  return reagentDetailView(row, me)
})
