import { type Kysely, sql } from 'kysely'

// One row per campus sign-in started: what the callback must check (state, nonce, PKCE verifier,
// the browser that started it) kept on our side, so a state is good once, in one browser, for a
// few minutes, whichever server process receives the callback.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.createTable('campus_sign_in_requests')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('state_hash', 'text', (c) => c.notNull().unique())
    .addColumn('browser_hash', 'text', (c) => c.notNull())
    .addColumn('nonce', 'text', (c) => c.notNull())
    .addColumn('code_verifier', 'text', (c) => c.notNull())
    .addColumn('next_path', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('used_at', 'timestamptz')
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('campus_sign_in_requests').execute()
}
