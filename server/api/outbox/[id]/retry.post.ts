import { z } from 'zod'

const paramsSchema = z.object({ id: z.coerce.number().int().positive() })

export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { id } = readParamsAs(event, paramsSchema)
  const row = await useDb().selectFrom('mailMessages').select(['id', 'status'])
    .where('id', '=', id).where('createdBy', '=', me.id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Message not found' })
  if (row.status !== 'failed') throw createError({ statusCode: 409, statusMessage: 'Only a message that gave up can be retried' })
  await requeueMail(id)
  setResponseStatus(event, 202)
  return { id, status: 'queued' }
})
