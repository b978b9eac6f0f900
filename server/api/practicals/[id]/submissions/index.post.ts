import { idParamsSchema } from '#shared/types/fields'
import { z } from 'zod'
import { createSubmission } from '../../../../services/submissions'

const keySchema = z.string().trim().min(1).max(200).nullable()

// Public contract: multipart `file` (peak table or raw trace), optional Idempotency-Key.
export default defineEventHandler(async (event) => {
  requireRole(event, 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  const scope = await requirePracticalAccess(event, id)
  const key = validate(keySchema, getRequestHeader(event, 'idempotency-key') ?? null)
  const upload = readUpload(event).then(({ file }) => file)
  const { status, body } = await createSubmission(useDb(), actorOf(event), scope, upload, key)
  setResponseStatus(event, status)
  return body
})
