import { idParamsSchema } from '#shared/types/fields'
import { requireEnrollmentAccess, withdrawEnrollment } from '~~/server/services/roster'

// Withdrawn, not deleted: the enrolment stays for the record, without a station.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { enrollment } = await requireEnrollmentAccess(event, id, 'manage')
  return withdrawEnrollment(useDb(), actorOf(event), enrollment)
})
