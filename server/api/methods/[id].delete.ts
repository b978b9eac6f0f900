import { libraryIdParamsSchema } from '#shared/types/library'

export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, libraryIdParamsSchema)
  const { row } = await requireLibraryEntry(event, 'methods', id, 'edit')
  await deleteLibraryEntry(event, 'methods', id, row)
  setResponseStatus(event, 204)
  return null
})
