import { idParamsSchema } from '#shared/types/fields'
import { digestSendSchema, type DigestSent } from '#shared/types/results'

// Sends (now, or at sendAt) one digest per section: students get the class figures and their
// own result, the section's TAs and the course's instructors the section table. Owners only.
export default defineEventHandler(async (event): Promise<DigestSent> => {
  requireRole(event, 'instructor')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id, 'manage')
  const body = await readBodyAs(event, digestSendSchema)
  const stranger = body.sectionIds.find((s) => !scope.sessionSectionIds.includes(s))
  if (stranger !== undefined) invalid([{ field: 'sectionIds', message: `Section ${stranger} does not run this practical` }])
  const sendAt = body.sendAt ? new Date(body.sendAt) : null
  // A minute's grace for the clock of the sender's device; "now" is simply no sendAt.
  if (sendAt && sendAt.getTime() < Date.now() - 60_000) invalid([{ field: 'sendAt', message: 'Pick a time in the future, or send now' }])
  const key = getRequestHeader(event, 'idempotency-key')?.trim().slice(0, 200) || null
  const sent = await sendDigests(event, scope, body.sectionIds, sendAt, key)
  setResponseStatus(event, 202)
  return sent
})
