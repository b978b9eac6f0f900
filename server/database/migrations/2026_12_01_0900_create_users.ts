import { type Kysely, sql } from 'kysely'

// Frozen in time: never import app code here, so later refactors cannot change history.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('users')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    // Stored lower-cased, so the unique constraint is case-insensitive without citext.
    .addColumn('email', 'text', (c) => c.notNull().unique().check(sql`email = lower(email)`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) =>
      c.notNull().check(sql`role in ('instructor', 'ta', 'coordinator', 'student')`))
    .addColumn('password_hash', 'text')
    .addColumn('session_version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('disabled_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()

  await db.schema
    .createTable('login_attempts')
    .addColumn('id', 'bigint', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('ip', 'text', (c) => c.notNull())
    .addColumn('succeeded', 'boolean', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('login_attempts_email_time').on('login_attempts').columns(['email', 'created_at']).execute()
  await db.schema.createIndex('login_attempts_ip_time').on('login_attempts').columns(['ip', 'created_at']).execute()

  await db.schema
    .createTable('audit_log')
    .addColumn('id', 'bigint', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('actor_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('entity', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text')
    .addColumn('before', 'jsonb')
    .addColumn('after', 'jsonb')
    .addColumn('ip', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('audit_log_entity').on('audit_log').columns(['entity', 'entity_id']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('audit_log').execute()
  await db.schema.dropTable('login_attempts').execute()
  await db.schema.dropTable('users').execute()
}
