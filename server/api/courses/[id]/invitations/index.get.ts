import { idParamsSchema } from '#shared/types/fields'
import type { OpenInvitations } from '#shared/types/roster'
import { openInvitationsOf } from '~~/server/services/roster'

// How many of the course's students and TAs have not set a password yet (owners only).
export default defineEventHandler(async (event): Promise<OpenInvitations> => {
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  return openInvitationsOf(useDb(), course.id)
})
