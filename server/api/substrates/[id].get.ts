import { libraryIdParamsSchema, type SubstrateDetail } from '#shared/types/library'

export default defineEventHandler(async (event): Promise<SubstrateDetail> => {
  requireLibraryReader(event)
  const { id } = readParamsAs(event, libraryIdParamsSchema)
  const { me, row } = await requireLibraryEntry(event, 'substrates', id, 'read')
  return substrateDetail(row, me)
})
