import PgBoss from 'pg-boss'
import { CompiledQuery, type Kysely, type Transaction } from 'kysely'
import { migrateToLatest } from '../database/migrator'
import type { Database } from '../database/schema'
import { registerWorkers } from '../workers'

export const MAIL_QUEUE = 'mail-send'

let ready: Promise<PgBoss> | undefined
let boss: PgBoss | undefined
let stopWorkers: (() => Promise<void>) | undefined

async function boot(): Promise<PgBoss> {
  await migrateToLatest(useDb())
  const instance = new PgBoss({
    connectionString: useRuntimeConfig().databaseUrl,
    max: 4,
    application_name: 'halocline-queue',
    // Maintenance moves jobs past their expiry back to 'retry' (a worker that stalled or died);
    // pg-boss's default is every 2 minutes. One process does it per interval, whichever asks first.
    supervise: true,
    maintenanceIntervalSeconds: mailSettings().maintenanceSeconds,
  })
  // pg-boss reports lost connections as events; unheard, they would crash the process.
  instance.on('error', (error) => console.warn(`[queue] ${error.message}`))
  await instance.start()
  try {
    stopWorkers = await registerWorkers(instance, usePresence())
  } catch (error) {
    await instance.stop({ graceful: false }).catch(() => {})
    throw error
  }
  boss = instance
  return instance
}

/**
 * Migrations, then the queue, once per process. A failed start (database down) is not
 * remembered, so the next caller tries again instead of inheriting the old rejection.
 */
export function useQueue(): Promise<PgBoss> {
  ready ??= boot().catch((error) => {
    ready = undefined
    throw error
  })
  return ready
}

export async function stopQueue() {
  const instance = boss
  const workers = stopWorkers
  boss = undefined
  stopWorkers = undefined
  ready = undefined
  await workers?.().catch(() => {})
  await instance?.stop({ graceful: true, timeout: 5000 }).catch(() => {})
  await stopPresence()
}

/** Lets pg-boss insert its job inside our transaction: the job exists only if the row commits. */
export function inTransaction(trx: Kysely<Database> | Transaction<Database>): PgBoss.Db {
  return {
    executeSql: async (text, values) => {
      const result = await trx.executeQuery(CompiledQuery.raw(text, values))
      return { rows: result.rows }
    },
  }
}
