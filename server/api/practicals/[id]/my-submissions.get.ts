import { idParamsSchema } from '#shared/types/fields'
import { enrolmentColumns, mySubmissionsOf, type MySubmissionsView } from '../../../services/submissions'

// A student's own GC results for a practical: every version of their work unit, newest first,
// with flags, the computed result and the reviewers' decisions (scores only once released).
// Staff read submissions through the review routes, so any other role gets 403 here.
export default defineEventHandler(async (event): Promise<MySubmissionsView> => {
  requireRole(event, 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  const { scope, columns: enrolment } = await requirePracticalAccessWith(event, id, enrolmentColumns)
  return mySubmissionsOf(useDb(), scope, enrolment)
})
