import { idParamsSchema } from '#shared/types/fields'
import { deleteLibraryEntry, requireLibraryEntry } from '~~/server/services/library'
// Windows and standard-run rows go with the substrate; the uploaded files themselves are kept.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row } = await requireLibraryEntry(event, 'substrates', id, 'edit')
  const windows = await useDb().selectFrom('substrateWindows').selectAll().where('substrateId', '=', id).execute()
  await deleteLibraryEntry(useDb(), actorOf(event), 'substrates', id, { ...row, windows })
  setResponseStatus(event, 204)
  return null
})
