import { listMailbox, requireDemoMailbox } from '../../../services/outbox'

export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  return listMailbox(useDb(), me, requireDemoMailbox(useRuntimeConfig(event)))
})
