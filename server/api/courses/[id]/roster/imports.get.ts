import { idParamsSchema } from '#shared/types/fields'
import type { RosterImportHistoryItem } from '#shared/types/roster'

export default defineEventHandler(async (event): Promise<RosterImportHistoryItem[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const rows = await useDb().selectFrom('rosterImports')
    .innerJoin('files', 'files.id', 'rosterImports.fileId')
    .leftJoin('users', 'users.id', 'rosterImports.createdBy')
    .select(['rosterImports.id', 'rosterImports.createdAt', 'rosterImports.summary', 'files.originalName', 'users.name'])
    .where('rosterImports.courseId', '=', course.id)
    .orderBy('rosterImports.createdAt', 'desc').orderBy('rosterImports.id', 'desc')
    .limit(100).execute()
  return rows.map((r) => ({
    id: r.id,
    createdAt: r.createdAt.toISOString(),
    by: r.name,
    fileName: r.originalName,
    summary: r.summary,
  }))
})
