import { randomUUID } from 'node:crypto'

// Lets staff check the mail settings end to end: a message to themselves through the queue.
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { email } = await useDb().selectFrom('users').select('email').where('id', '=', me.id).executeTakeFirstOrThrow()
  const key = getRequestHeader(event, 'idempotency-key') ?? randomUUID()
  const result = await useDb().transaction().execute((trx) => queueMail(trx, {
    key: `test:${me.id}:${key}`,
    kind: 'test',
    to: [email],
    subject: 'Halocline test message',
    text: `Hello ${me.name},\n\nThis is a test message from Halocline. If you can read it, e-mail delivery works.\n`,
    html: `<p>Hello ${escapeHtml(me.name)},</p><p>This is a test message from Halocline. If you can read it, e-mail delivery works.</p>`,
    createdBy: me.id,
  }))
  setResponseStatus(event, 202)
  return result
})
