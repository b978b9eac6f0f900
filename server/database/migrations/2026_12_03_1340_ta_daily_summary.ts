import type { Kysely } from 'kysely'

// Each person's choice about the daily summary of new runs (sent to TAs): on unless they opt out.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('users').addColumn('daily_summary', 'boolean', (c) => c.notNull().defaultTo(true)).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('daily_summary').execute()
}
