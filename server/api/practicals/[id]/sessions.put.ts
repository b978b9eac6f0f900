import { idParamsSchema } from '#shared/types/fields'
import { sessionsInputSchema, type SessionView } from '#shared/types/practical'
import { practicalSessionViews, setPracticalSessions } from '~~/server/services/practicals'

// Which sections run the practical at which of their meetings, and when results are due.
export default defineEventHandler(async (event): Promise<SessionView[]> => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requirePracticalAccess(event, id, 'manage')
  const { sessions } = await readBodyAs(event, sessionsInputSchema)
  await setPracticalSessions(useDb(), actorOf(event), id, course, sessions)
  return (await practicalSessionViews([id], null)).get(id) ?? []
})
