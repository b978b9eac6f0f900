import { referenceParamsSchema } from '#shared/types/library'
import { requireLibraryEntry } from '~~/server/services/library'

// Removes a reference distribution: runs go back to being judged against the class model.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  const { id, reagent } = readParamsAs(event, referenceParamsSchema)
  await requireLibraryEntry(event, 'substrates', id, 'edit')
  const removed = await useDb().transaction().execute(async (trx) => {
    const before = await trx.deleteFrom('substrateReferences').where('substrateId', '=', id).where('reagent', '=', reagent)
      .returning(['percents', 'source', 'sourceKind']).executeTakeFirst()
    if (before) await audit(trx, event, { action: 'substrate.reference.delete', entity: 'substrate', entityId: id, before: { reagent, ...before } })
    return Boolean(before)
  })
  if (!removed) throw createError({ statusCode: 404, statusMessage: 'No reference distribution for this reagent' })
  setResponseStatus(event, 204)
  return null
})
