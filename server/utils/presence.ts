import { randomInt } from 'node:crypto'
import pg from 'pg'
import { sql, type Expression, type RawBuilder } from 'kysely'
import { retryWithBackoff } from './backoff'

// "This server process is alive", told through PostgreSQL: each process holds a session-level
// advisory lock (PRESENCE_LOCK_CLASS, its own key) on a connection of its own. When the process
// dies, even by kill -9, the kernel closes that socket and PostgreSQL drops the lock at once, so
// another process can see that work claimed under the key has no live owner.
export const PRESENCE_LOCK_CLASS = 0x48414c4f // 'HALO'

export interface Presence {
  /** This process's key, written into the rows it claims. */
  readonly key: number
  /** Whether the lock is held right now (false while the database is unreachable). */
  held(): boolean
  /** How long the lock has been held without a break; 0 when it is not held. */
  heldForMs(): number
  stop(): Promise<void>
}

let current: Presence | undefined

/** The process's presence, started on first use; it reconnects by itself after a database outage. */
export function usePresence(): Presence {
  current ??= startPresence(useRuntimeConfig().databaseUrl)
  return current
}

export async function stopPresence() {
  const presence = current
  current = undefined
  await presence?.stop()
}

function startPresence(connectionString: string): Presence {
  let key = randomInt(1, 2 ** 31 - 1)
  let everHeld = false
  let client: pg.Client | undefined
  let since: number | null = null
  // Reconnect quickly: a live process that lets another see its lock missing for long may
  // have its messages sent again by that other process.
  const retry = retryWithBackoff(() => void connect())

  const lost = (which: pg.Client) => {
    if (which !== client) return
    client = undefined
    since = null
    which.end().catch(() => {})
    retry.schedule()
  }
  const connect = async () => {
    const candidate = new pg.Client({
      connectionString,
      application_name: 'halocline-presence',
      keepAlive: true,
      connectionTimeoutMillis: 3000,
    })
    candidate.on('error', () => lost(candidate))
    candidate.on('end', () => lost(candidate))
    client = candidate
    try {
      await candidate.connect()
      const { rows } = await candidate.query<{ locked: boolean }>(
        'select pg_try_advisory_lock($1, $2) as locked',
        [PRESENCE_LOCK_CLASS, key],
      )
      if (!rows[0]?.locked) {
        // Another live process drew the same key: draw again, unless rows may already carry this
        // one (then the refusal is our own old session, about to be dropped by PostgreSQL).
        if (!everHeld) key = randomInt(1, 2 ** 31 - 1)
        throw new Error('presence lock is taken')
      }
      if (retry.stopped) return void candidate.end().catch(() => {})
      everHeld = true
      since = Date.now()
      retry.succeeded()
    } catch {
      lost(candidate)
    }
  }
  void connect()

  return {
    get key() { return key },
    held: () => since !== null,
    heldForMs: () => (since === null ? 0 : Date.now() - since),
    async stop() {
      retry.stop()
      const open = client
      client = undefined
      since = null
      await open?.end().catch(() => {})
    },
  }
}

/** SQL: "the process whose presence key is in this column or value is alive". */
export function presenceAlive(key: Expression<number | null>): RawBuilder<boolean> {
  return sql<boolean>`exists (select 1 from pg_locks l where l.locktype = 'advisory' and l.granted
    and l.database = (select oid from pg_database where datname = current_database())
    and l.classid = ${PRESENCE_LOCK_CLASS}::oid and l.objid = ${key}::oid and l.objsubid = 2)`
}
