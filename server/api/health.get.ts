import { sql } from 'kysely'

// How long a successful check answers for. Probes that arrive while a check is on its way share
// its answer, and so do probes within this long after one succeeded: under a burst of polls the
// database sees a few `select 1` a second, and no probe waits for a round trip it need not make.
// A failed check is never reused, so an outage shows at the next probe; 50 ms is far below any
// load balancer's polling interval (seconds, common practice).
const OK_FOR_MS = 50

let inFlight: Promise<boolean> | null = null
let okUntil = 0

function checkDatabase(): Promise<boolean> | true {
  if (performance.now() < okUntil) return true
  inFlight ??= sql`select 1`.execute(useDb()).then(() => {
    okUntil = performance.now() + OK_FOR_MS
    return true
  }, () => false).finally(() => {
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
