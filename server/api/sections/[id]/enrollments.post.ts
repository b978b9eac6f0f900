import { idParamsSchema } from '#shared/types/fields'
import { enrollmentAddSchema, type EnrollmentAdded } from '#shared/types/roster'
import { addEnrollment } from '~~/server/services/roster'

// One student into one section: an existing account is reused, a new person is invited.
export default defineEventHandler(async (event): Promise<EnrollmentAdded> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { section, course } = await requireSectionAccess(event, id, 'manage')
  const input = await readBodyAs(event, enrollmentAddSchema)
  const ctx = { course, me, appUrl: useRuntimeConfig(event).public.appUrl }
  const result = await addEnrollment(useDb(), actorOf(event), ctx, section, input)
  setResponseStatus(event, 201)
  return result
})
