import { idParamsSchema } from '#shared/types/fields'
import type { ConflictView } from '#shared/types/section'
import { conflictsFor } from '~~/server/services/sections'

// The whole course at once: the same check every save runs, for the course page's overview.
export default defineEventHandler(async (event): Promise<ConflictView[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireCourseAccess(event, id)
  if (scope.role === 'student') throw createError({ statusCode: 403, statusMessage: 'Conflicts are for course staff' })
  const sections = await useDb().selectFrom('sections').select('id').where('courseId', '=', id).execute()
  const visible = sections.map((s) => s.id).filter((sid) => !scope.sectionIds || scope.sectionIds.includes(sid))
  const conflicts = await conflictsFor(visible)
  return conflicts.map(({ kind, sectionIds, dates, message }) => ({ kind, sectionIds, dates, message }))
})
