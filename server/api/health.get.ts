import { sql } from 'kysely'

// Probes that arrive while a check is on its way share its answer: under a burst of polls the
// database sees one `select 1` at a time, and every answer still comes from a check that ended
// after the probe arrived.
let inFlight: Promise<boolean> | null = null

function checkDatabase(): Promise<boolean> {
  inFlight ??= sql`select 1`.execute(useDb()).then(() => true, () => false).finally(() => {
    inFlight = null
  })
  return inFlight
}

// Public on purpose: load balancers and the start script poll it without a session.
export default defineEventHandler(async (event) => {
  if (await checkDatabase()) return { status: 'ok', database: 'ok' }
  setResponseStatus(event, 503)
  return { status: 'degraded', database: 'down' }
})
