import pg from 'pg'
import { sql, type Kysely } from 'kysely'
import type { Database } from '../database/schema'
import { retryWithBackoff } from './backoff'
import { forgetAccount, forgetAllAccounts } from './session-cache'

// Each process keeps an account's session version for a few seconds (session-cache.ts). A logout
// or a password change through one process must end the session in every other one at once, not
// seconds later: the change is announced with NOTIFY, and each process LISTENs on a connection of
// its own and forgets that account. While that connection is down announcements may be missed,
// so nothing is kept until it is back (accountNoticesLive() is false and every request asks).
const CHANNEL = 'halocline_account_changes'

interface Listener { live: boolean, stop(): Promise<void> }

let listener: Listener | undefined

/** Whether this process hears every account change now; starts listening on first use. */
export function accountNoticesLive(): boolean {
  listener ??= listen(useRuntimeConfig().databaseUrl)
  return listener.live
}

export async function stopAccountNotices() {
  const current = listener
  listener = undefined
  await current?.stop()
}

/** Tells every process (this one at once) that an account's sessions or state changed. */
export async function announceAccountChange(db: Kysely<Database>, userId: number) {
  forgetAccount(userId)
  await sql`select pg_notify(${CHANNEL}, ${String(userId)})`.execute(db)
}

function listen(connectionString: string): Listener {
  let client: pg.Client | undefined
  const retry = retryWithBackoff(() => void connect())
  const state: Listener = {
    live: false,
    async stop() {
      retry.stop()
      state.live = false
      const open = client
      client = undefined
      await open?.end().catch(() => {})
    },
  }
  const lost = (which: pg.Client) => {
    if (which !== client) return
    client = undefined
    state.live = false
    forgetAllAccounts()
    which.end().catch(() => {})
    retry.schedule()
  }
  const connect = async () => {
    const candidate = new pg.Client({
      connectionString, application_name: 'halocline-account-notices', keepAlive: true, connectionTimeoutMillis: 3000,
    })
    candidate.on('error', () => lost(candidate))
    candidate.on('end', () => lost(candidate))
    candidate.on('notification', (message) => {
      const userId = Number(message.payload)
      if (Number.isInteger(userId)) forgetAccount(userId)
    })
    client = candidate
    try {
      await candidate.connect()
      await candidate.query(`listen ${CHANNEL}`)
      if (retry.stopped) return void candidate.end().catch(() => {})
      // What was kept before this connection may have missed announcements.
      forgetAllAccounts()
      state.live = true
      retry.succeeded()
    } catch {
      lost(candidate)
    }
  }
  void connect()
  return state
}
