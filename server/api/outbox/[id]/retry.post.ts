import { idParamsSchema } from '#shared/types/fields'
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { id } = readParamsAs(event, idParamsSchema)
  const row = await useDb().selectFrom('mailMessages').select(['id', 'status'])
    .where('id', '=', id).where('createdBy', '=', me.id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Message not found' })
  if (row.status !== 'failed') throw createError({ statusCode: 409, statusMessage: 'Only a message that gave up can be retried' })
  await requeueMail(id)
  setResponseStatus(event, 202)
  return { id, status: 'queued' }
})
