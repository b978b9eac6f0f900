import { referenceParamsSchema } from '#shared/types/library'
import { deleteSubstrateReference, requireLibraryEntry } from '~~/server/services/library'

// Removes a reference distribution: runs go back to being judged against the class model.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  const { id, reagent } = readParamsAs(event, referenceParamsSchema)
  await requireLibraryEntry(event, 'substrates', id, 'edit')
  const removed = await deleteSubstrateReference(useDb(), actorOf(event), id, reagent)
  if (!removed) throw createError({ statusCode: 404, statusMessage: 'No reference distribution for this reagent' })
  setResponseStatus(event, 204)
  return null
})
