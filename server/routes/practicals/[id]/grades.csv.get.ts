import { idParamsSchema } from '#shared/types/fields'
import { buildGradeSheet, requireReviewerOf, setReviewDownloadHeaders } from '../../../services/review'
// The grade sheet as CSV, one row per student, safe to open in a spreadsheet (no cell can start
// a formula; numbers stay numbers). A TA gets their own sections' students only.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'ta')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requireReviewerOf(event, id)
  const { fileName, csv } = await buildGradeSheet(scope)
  setReviewDownloadHeaders(event, fileName, 'text/csv; charset=utf-8')
  return csv
})
