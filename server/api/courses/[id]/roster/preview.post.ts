import { idParamsSchema } from '#shared/types/fields'
import type { RosterPreview } from '#shared/types/roster'
import { planRosterImport, rosterPreviewRows } from '~~/server/services/roster'

// What an import of this file would do, row by row, before anything is written.
export default defineEventHandler(async (event): Promise<RosterPreview> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const upload = await readUpload(event)
  const plan = await planRosterImport(useDb(), course.id, upload)
  return {
    fileName: plan.fileName,
    columns: plan.columns,
    mapping: plan.mapping,
    mappingIssues: plan.mappingIssues,
    rows: rosterPreviewRows(plan.rows),
    summary: plan.summary,
    conflicts: plan.conflicts,
  }
})
