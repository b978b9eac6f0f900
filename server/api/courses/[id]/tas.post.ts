import { idParamsSchema } from '#shared/types/fields'
import { taInviteSchema, type TaInvited } from '#shared/types/roster'
import { inviteTa } from '~~/server/services/roster'

// A TA by e-mail onto some of the course's sections: a new person gets an invitation to set a
// password, an existing TA is added at once. Owners only.
export default defineEventHandler(async (event): Promise<TaInvited> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const input = await readBodyAs(event, taInviteSchema)
  const result = await inviteTa(useDb(), actorOf(event), { course, me, appUrl: useRuntimeConfig(event).public.appUrl }, input)
  setResponseStatus(event, 201)
  return result
})
