import { sql } from 'kysely'

// Public on purpose: load balancers and the start script poll it without a session.
export default defineEventHandler(async (event) => {
  try {
    await sql`select 1`.execute(useDb())
    return { status: 'ok', database: 'ok' }
  } catch {
    setResponseStatus(event, 503)
    return { status: 'degraded', database: 'down' }
  }
})
