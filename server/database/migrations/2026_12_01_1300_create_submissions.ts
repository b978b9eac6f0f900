import { type Kysely, sql } from 'kysely'

const now = sql`now()`

// GC results: every uploaded version, its computed result and flags, and the reviews of it.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('submissions')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('practical_id', 'integer', (c) => c.notNull().references('practicals.id'))
    .addColumn('section_id', 'integer', (c) => c.notNull().references('sections.id'))
    // The work unit a result belongs to: 'station:<section>:<n>' for a pair, 'user:<id>' alone.
    .addColumn('unit_key', 'text', (c) => c.notNull())
    .addColumn('version', 'integer', (c) => c.notNull().check(sql`version >= 1`))
    .addColumn('file_id', 'integer', (c) => c.notNull().references('files.id'))
    .addColumn('input_kind', 'text', (c) => c.notNull().check(sql`input_kind in ('peak-table', 'trace')`))
    .addColumn('sha256', 'text', (c) => c.notNull())
    .addColumn('parsed', 'jsonb', (c) => c.notNull())
    .addColumn('result', 'jsonb', (c) => c.notNull())
    .addColumn('flags', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    // 2 = a flag that blocks acceptance, 1 = a warning, 0 = clean: the queue sorts on it.
    .addColumn('attention', 'smallint', (c) => c.notNull().defaultTo(0))
    .addColumn('factor_secondary', 'numeric')
    .addColumn('factor_tertiary', 'numeric')
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('pending').check(sql`status in ('pending', 'accepted', 'returned')`))
    .addColumn('late', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('submitted_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('idempotency_key', 'text')
    .addColumn('excluded_at', 'timestamptz')
    .addColumn('excluded_by', 'integer', (c) => c.references('users.id'))
    .addColumn('exclusion_reason', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addUniqueConstraint('submissions_unit_version', ['practical_id', 'unit_key', 'version'])
    .execute()
  await db.schema.createIndex('submissions_idempotency').on('submissions')
    .columns(['submitted_by', 'idempotency_key']).unique().where(sql<boolean>`idempotency_key is not null`)
    .execute()
  await db.schema.createIndex('submissions_practical_section').on('submissions')
    .columns(['practical_id', 'section_id', 'unit_key', 'version'])
    .execute()

  await db.schema
    .createTable('submission_members')
    .addColumn('submission_id', 'integer', (c) => c.notNull().references('submissions.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id'))
    .addPrimaryKeyConstraint('submission_members_pk', ['submission_id', 'user_id'])
    .execute()
  await db.schema.createIndex('submission_members_user').on('submission_members').column('user_id').execute()

  await db.schema
    .createTable('reviews')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('submission_id', 'integer', (c) => c.notNull().references('submissions.id').onDelete('cascade'))
    .addColumn('reviewer_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('decision', 'text', (c) => c.notNull().check(sql`decision in ('accept', 'return')`))
    .addColumn('reason', 'text')
    .addColumn('comment', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('scores', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .addColumn('total', 'numeric')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('reviews_return_reason', sql`decision <> 'return' or (reason is not null and length(trim(reason)) > 0)`)
    .execute()
  await db.schema.createIndex('reviews_submission').on('reviews').columns(['submission_id', 'created_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('reviews').execute()
  await db.schema.dropTable('submission_members').execute()
  await db.schema.dropTable('submissions').execute()
}
