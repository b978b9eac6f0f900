import { idParamsSchema } from '#shared/types/fields'
import { substratePatchSchema, substrateSourceIssue, type SubstrateDetail } from '#shared/types/library'
import { refuseWhileInUse, requireLibraryEntry, substrateDetail, substrateIdentity } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row: before } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const patch = await readBodyAs(event, substratePatchSchema)
  const sourceIssue = substrateSourceIssue({ ...before, ...patch })
  if (sourceIssue) invalid([{ field: 'source', message: sourceIssue }])
  const identity = patch.smiles === undefined ? null : await substrateIdentity(patch.smiles)
  const structureChanged = identity !== null && identity.smiles !== before.smiles
  // Students' results were read against this structure's products.
  if (structureChanged) await refuseWhileInUse('substrates', id, 'given another structure')

  const row = await useDb().transaction().execute(async (trx) => {
    const updated = await trx.updateTable('substrates')
      .set({ ...patch, ...(identity ?? {}), updatedAt: new Date() })
      .where('id', '=', id).returningAll().executeTakeFirstOrThrow()
    // Product windows of the old structure name products the new one does not have.
    const dropped = structureChanged
      ? await trx.deleteFrom('substrateWindows').where('substrateId', '=', id).where('kind', '=', 'product').returning(['productSmiles', 'rtMin', 'rtMax']).execute()
      : []
    // So do their names and reference distributions.
    const droppedNames = structureChanged ? await trx.deleteFrom('substrateProductNames').where('substrateId', '=', id).returning(['productSmiles', 'name']).execute() : []
    const droppedReferences = structureChanged ? await trx.deleteFrom('substrateReferences').where('substrateId', '=', id).returning(['reagent', 'percents', 'source']).execute() : []
    await audit(trx, event, { action: 'substrate.update', entity: 'substrate', entityId: id, before, after: { ...patch, ...(identity ?? {}), droppedWindows: dropped, droppedNames, droppedReferences } })
    return updated
  })
  return substrateDetail(row, me)
})
