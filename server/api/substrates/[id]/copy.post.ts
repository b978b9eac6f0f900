import { idParamsSchema } from '#shared/types/fields'
import type { SubstrateDetail } from '#shared/types/library'
import { copySubstrate, requireLibraryEntry, substrateDetail } from '~~/server/services/library'

// A shared (or co-owner's) entry becomes the caller's own: windows, standard runs, product
// names and reference distributions included.
export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row: original } = await requireLibraryEntry(event, 'substrates', id, 'read')
  const row = await copySubstrate(useDb(), actorOf(event), me.id, original)
  setResponseStatus(event, 201)
  return substrateDetail(row, me)
})
