import { idParamsSchema } from '#shared/types/fields'
import type { SubstrateDetail } from '#shared/types/library'
import { requireLibraryEntry, requireLibraryReader, substrateDetail } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  requireLibraryReader(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row } = await requireLibraryEntry(event, 'substrates', id, 'read')
  return substrateDetail(row, me)
})
