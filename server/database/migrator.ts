import { type Kysely, Migrator } from 'kysely'
import { migrations } from './migrations'

export interface MigrationReport {
  applied: string[]
}

/** Applies every pending migration; safe to call from several processes at once (Kysely takes a lock). */
export async function migrateToLatest<DB>(db: Kysely<DB>): Promise<MigrationReport> {
  // Migrations are written in snake_case: run them without the camel-case plugin.
  const migrator = new Migrator({
    db: db.withoutPlugins(),
    provider: { getMigrations: async () => migrations },
    // Work that lands in a different order than its migrations were named (a database that
    // already ran a later-dated migration) still gets the earlier one instead of refusing.
    allowUnorderedMigrations: true,
  })
  const { error, results } = await migrator.migrateToLatest()
  if (error) {
    const failed = results?.find((r) => r.status === 'Error')
    const where = failed ? ` (${failed.migrationName})` : ''
    throw new Error(`Migration failed${where}: ${error instanceof Error ? error.message : String(error)}`)
  }
  return { applied: (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName) }
}
