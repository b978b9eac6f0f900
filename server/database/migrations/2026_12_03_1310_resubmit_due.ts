import { type Kysely, sql } from 'kysely'

// A return may give the work unit a new due time: the course says how many days a return gives
// by default, and each return row keeps the due time it set, which the late mark of a later
// upload is judged against.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('courses')
    .addColumn('resubmit_days', 'integer', (c) => c.notNull().defaultTo(3).check(sql`resubmit_days between 0 and 60`))
    .execute()
  await db.schema.alterTable('reviews').addColumn('resubmit_due_at', 'timestamptz').execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('reviews').dropColumn('resubmit_due_at').execute()
  await db.schema.alterTable('courses').dropColumn('resubmit_days').execute()
}
