import { idParamsSchema } from '#shared/types/fields'
import type { MethodView } from '#shared/types/library'
import { copyMethod, requireLibraryEntry, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const { row: original } = await requireLibraryEntry(event, 'methods', id, 'read')
  const row = await copyMethod(useDb(), actorOf(event), me.id, original)
  setResponseStatus(event, 201)
  return toMethodView(row, me, 0)
})
