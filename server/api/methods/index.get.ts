import type { MethodView } from '#shared/types/library'
import { libraryScope, libraryUsage, requireLibraryReader, toMethodView } from '~~/server/services/library'

export default defineEventHandler(async (event): Promise<MethodView[]> => {
  const me = requireLibraryReader(event)
  const courseIds = await visibleCourseIds(me)
  const rows = await useDb().selectFrom('methods').selectAll()
    .where(libraryScope(me, courseIds, 'methods'))
    .orderBy('name').orderBy('id').execute()
  const usage = await libraryUsage('methods', rows.map((r) => r.id))
  return rows.map((row) => toMethodView(row, me, usage.get(row.id) ?? 0))
})
