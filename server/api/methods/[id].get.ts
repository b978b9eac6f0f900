import { idParamsSchema } from '#shared/types/fields'
import type { MethodView } from '#shared/types/library'
import { libraryUsage, requireLibraryEntry, requireLibraryReader, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView> => {
  requireLibraryReader(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { me, row } = await requireLibraryEntry(event, 'methods', id, 'read')
  const usage = await libraryUsage('methods', [id])
  return toMethodView(row, me, usage.get(id) ?? 0)
})
