import { idParamsSchema } from '#shared/types/fields'
import { deleteLibraryEntry, requireLibraryEntry } from '~~/server/services/library'

export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row } = await requireLibraryEntry(event, 'methods', id, 'edit')
  await deleteLibraryEntry(useDb(), actorOf(event), 'methods', id, row)
  setResponseStatus(event, 204)
  return null
})
