import { randomUUID } from 'node:crypto'
import { queueTestMessage } from '../../services/outbox'

// Lets staff check the mail settings end to end: a message to themselves through the queue.
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const key = getRequestHeader(event, 'idempotency-key') ?? randomUUID()
  const result = await queueTestMessage(useDb(), me, key)
  setResponseStatus(event, 202)
  return result
})
