import { CamelCasePlugin, Kysely, PostgresDialect, type PostgresPool, type PostgresPoolClient } from 'kysely'
import pg from 'pg'
import type { Database } from './schema'

// bigint ids and counts: parse as numbers; our tables never approach 2^53 rows.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number.parseInt(v, 10))
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number.parseFloat(v))
// Keep DATE columns as 'YYYY-MM-DD' text: a JS Date would shift them by the server's time zone.
pg.types.setTypeParser(pg.types.builtins.DATE, (v) => v)
// date[] likewise: '{2026-11-19,2026-11-26}' → ['2026-11-19', '2026-11-26'] (dates hold no commas or quotes).
const DATE_ARRAY_OID = 1182
pg.types.setTypeParser(DATE_ARRAY_OID as Parameters<typeof pg.types.setTypeParser>[0], (v) => (v === '{}' ? [] : v.slice(1, -1).split(',')))

export interface ConnectionOptions {
  max?: number
  applicationName?: string
  onError?: (error: Error) => void
  /** How long to wait for a connection, new or from a full pool (3 s unless given). */
  connectionTimeoutMillis?: number
}

export function createPool(connectionString: string, options: ConnectionOptions = {}): pg.Pool {
  const pool = new pg.Pool({
    connectionString,
    max: options.max ?? 10,
    // Fail fast when PostgreSQL is down: requests answer 503 instead of hanging.
    connectionTimeoutMillis: options.connectionTimeoutMillis ?? 3000,
    idleTimeoutMillis: 30_000,
    application_name: options.applicationName ?? 'halocline',
  })
  // A client whose socket dies (PostgreSQL restarted: "terminating connection due to
  // administrator command", "Connection terminated unexpectedly", ECONNRESET) emits 'error'.
  // pg-pool listens only while a client is idle; one checked out by a transaction between two
  // queries had no listener, and the unheard event would crash the process. The query in flight
  // still rejects (and becomes a 503); the pool drops the broken client when it is released.
  pool.on('connect', (client) => {
    client.on('error', (error) => options.onError?.(error))
  })
  // Idle clients report through the pool too; the listener above has already told onError.
  pool.on('error', () => {})
  return pool
}

// Statements sent as named prepared statements (preparedStatement): PostgreSQL parses each once
// per connection and, once it has seen a few, keeps a plan that does not depend on the values
// (when that plan is no costlier than the ones it made for them). A page's one large statement
// (the review queue's reads, with the scope check) took longer to plan than to run; read as an
// unnamed statement it was planned again on every request.
const statementNames = new Map<string, string>()

/**
 * Marks an SQL text (built once, values only as parameters) to be prepared on each connection,
 * and gives its name, for a caller that sends it on the pool itself.
 */
export function preparedStatement(sql: string): string {
  let name = statementNames.get(sql)
  if (!name) statementNames.set(sql, name = `halocline_${statementNames.size + 1}`)
  return name
}

// Kysely sends (text, values); a marked text goes as { name, text, values }, which pg prepares
// once per connection and then only binds and runs. One wrapper per client, as Kysely keys its
// connections by the client.
function namedStatements(pool: pg.Pool): PostgresPool {
  const wrappers = new WeakMap<pg.PoolClient, PostgresPoolClient>()
  const wrap = (client: pg.PoolClient) => {
    let wrapper = wrappers.get(client)
    if (!wrapper) {
      const query = (text: string, values: readonly unknown[]) => {
        const name = statementNames.get(text)
        // Kysely passes a fresh array of values each time.
        return name ? client.query({ name, text, values: values as unknown[] }) : client.query(text, values as unknown[])
      }
      // Only the (text, values) form: the other takes a cursor, and the dialect is given none.
      wrapper = { query: query as unknown as PostgresPoolClient['query'], release: () => client.release() }
      wrappers.set(client, wrapper)
    }
    return wrapper
  }
  return { connect: async () => wrap(await pool.connect()), end: () => pool.end() }
}

// Each database's own pool, for reads that skip Kysely's executor (readTextOnceCompiled in server/utils/db.ts).
const pools = new WeakMap<Kysely<Database>, pg.Pool>()

export function createDatabase(connectionString: string, options: ConnectionOptions = {}): Kysely<Database> {
  const pool = createPool(connectionString, options)
  const db = new Kysely<Database>({
    dialect: new PostgresDialect({ pool: namedStatements(pool) }),
    plugins: [new CamelCasePlugin({ maintainNestedObjectKeys: true })],
  })
  pools.set(db, pool)
  return db
}

/** The pool behind a database made by createDatabase (undefined for a transaction or another Kysely). */
export const poolOf = (db: Kysely<Database>): pg.Pool | undefined => pools.get(db)
