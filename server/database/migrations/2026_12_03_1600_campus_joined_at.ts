import type { Kysely } from 'kysely'

// When a person first signed in through the campus provider. Someone invited who never chooses a
// password (password sign-in off, or they simply use the campus button) has still joined: the
// roster must not keep calling them invited, nor send them new links.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('users').addColumn('campus_joined_at', 'timestamptz').execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('campus_joined_at').execute()
}
