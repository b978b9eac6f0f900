import { idParamsSchema } from '#shared/types/fields'
import { substratePatchSchema, type SubstrateDetail } from '#shared/types/library'
import { requireLibraryEntry, substrateDetail, substrateIdentity, updateSubstrate } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row: before } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const patch = await readBodyAs(event, substratePatchSchema)
  const row = await updateSubstrate(useDb(), actorOf(event), before, patch, substrateIdentity)
  return substrateDetail(row, me)
})
