import { idParamsSchema } from '#shared/types/fields'
import { digestSendSchema, type DigestSent } from '#shared/types/results'
import { sendDigests } from '../../../services/digests'

// Sends (now, or at sendAt) one digest per section: students get the class figures and their
// own result, the section's TAs and the course's instructors the section table. Owners only.
export default defineEventHandler(async (event): Promise<DigestSent> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id, 'manage')
  const body = await readBodyAs(event, digestSendSchema)
  const requestKey = getRequestHeader(event, 'idempotency-key')?.trim().slice(0, 200) || null
  const sendAt = body.sendAt ? new Date(body.sendAt) : null
  const sent = await sendDigests(useDb(), actorOf(event), scope, { sectionIds: body.sectionIds, sendAt, requestKey })
  setResponseStatus(event, 202)
  return sent
})
