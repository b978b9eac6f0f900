import { idParamsSchema } from '#shared/types/fields'
import { z } from 'zod'
import { createSubmission, uploadColumns } from '../../../../services/submissions'

const keySchema = z.string().trim().min(1).max(200).nullable()

// Public contract: multipart `file` (peak table or raw trace), optional Idempotency-Key.
export default defineEventHandler(async (event) => {
  const timing = requestTiming(event)
  requireRole(event, 'student')
  const { id } = readParamsAs(event, idParamsSchema)
  // The body is read while the caller's access is checked; a refusal of access still comes first.
  const upload = readUpload(event).then(({ file }) => {
    timing.since('body')
    return file
  })
  upload.catch(() => {})
  const { scope, columns: read } = await requirePracticalAccessWith(event, id, uploadColumns)
  timing.since('access')
  const key = validate(keySchema, getRequestHeader(event, 'idempotency-key') ?? null)
  const { status, body } = await createSubmission(useDb(), actorOf(event), scope, upload, key, read, timing)
  timing.since('handler')
  timing.send()
  setResponseStatus(event, status)
  return body
})
