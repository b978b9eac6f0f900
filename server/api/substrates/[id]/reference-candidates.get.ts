import { idParamsSchema } from '#shared/types/fields'
import type { ReferenceCandidate } from '#shared/types/library'
import { referenceCandidates, requireLibraryEntry } from '~~/server/services/library'

// Practicals of the caller's own courses with this substrate and accepted results, each with the
// mean mol % per product: what the library page offers to fill a reference distribution from.
export default defineEventHandler(async (event): Promise<ReferenceCandidate[]> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row: substrate } = await requireLibraryEntry(event, 'substrates', id, 'read')
  return referenceCandidates(me, substrate)
})
