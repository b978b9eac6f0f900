import { type Kysely, sql } from 'kysely'

// Section digests: one row per section per send. Its messages are the mail_messages keyed
// 'digest:<digest id>:<user id>', so a digest can never mail the same person twice.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('digests')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('practical_id', 'integer', (c) => c.notNull().references('practicals.id').onDelete('cascade'))
    .addColumn('section_id', 'integer', (c) => c.notNull().references('sections.id').onDelete('cascade'))
    // The sender's Idempotency-Key: pressing send twice gives back the same digests.
    .addColumn('request_key', 'text')
    .addColumn('scheduled_at', 'timestamptz')
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('queued').check(sql`status in ('queued', 'scheduled')`))
    .addColumn('recipient_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('digests_practical').on('digests').columns(['practical_id', 'created_at']).execute()
  await db.schema.createIndex('digests_request').on('digests').columns(['created_by', 'request_key', 'section_id']).unique()
    .where(sql<boolean>`request_key is not null`).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('digests').execute()
}
