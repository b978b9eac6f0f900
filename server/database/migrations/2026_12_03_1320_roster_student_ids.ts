import { type Kysely, sql } from 'kysely'

// The registrar's student id rides on the enrolment (one course, one id), unique among the
// course's active enrolments where it is given; a withdrawn enrolment keeps its id for the record.
// A roster import keeps the rows it skipped, with their reasons, so they can be fixed later.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('enrollments').addColumn('student_id', 'text').execute()
  await sql`create unique index enrollments_course_student_id_key on enrollments (course_id, student_id)
    where student_id is not null and status = 'active'`.execute(db)
  await db.schema.alterTable('roster_imports')
    .addColumn('skipped', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('roster_imports').dropColumn('skipped').execute()
  await db.schema.dropIndex('enrollments_course_student_id_key').execute()
  await db.schema.alterTable('enrollments').dropColumn('student_id').execute()
}
