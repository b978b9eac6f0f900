import { type Kysely, sql } from 'kysely'

// Frozen in time: never import app code here.
// A sign-in attempt is written before its password is checked, with succeeded = null until the
// check ends, so simultaneous attempts (in any process) count against the limits at once.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('login_attempts').alterColumn('succeeded', (c) => c.dropNotNull()).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  // Unfinished attempts counted as failures, which is how the limits treated them.
  await sql`update login_attempts set succeeded = false where succeeded is null`.execute(db)
  await db.schema.alterTable('login_attempts').alterColumn('succeeded', (c) => c.setNotNull()).execute()
}
