import { z } from 'zod'
import { recordIdParam } from '#shared/types/fields'
import { skippedRowsCsv } from '../../../../../../services/roster'

// The rows an import skipped, as a CSV the instructor can fix and choose again: the columns the
// import recognises (student id, name, e-mail, section) plus the row it came from and why.
const paramsSchema = z.object({ id: recordIdParam(), importId: recordIdParam() })

export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id, importId } = readParamsAs(event, paramsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const csv = await skippedRowsCsv(useDb(), course.id, importId)
  setResponseHeaders(event, {
    'Content-Type': 'text/csv; charset=utf-8',
    'Content-Disposition': `attachment; filename="roster-import-${importId}-skipped.csv"`,
    'Cache-Control': 'private, no-store',
  })
  return csv
})
