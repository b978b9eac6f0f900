import { idParamsSchema } from '#shared/types/fields'
import { resendInvitation } from '~~/server/services/roster'

// A fresh link for a student who has not set a password; their older links stop working.
// Only an instructor who owns a course the student is (or was) enrolled in may send it.
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const result = await resendInvitation(useDb(), actorOf(event), me, id, useRuntimeConfig(event).public.appUrl)
  setResponseStatus(event, 201)
  return result
})
