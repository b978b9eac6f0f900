import { type Kysely, sql } from 'kysely'

// Found with EXPLAIN (ANALYZE, BUFFERS) on the department benchmark's term (2,000 students,
// 20,000 versions: npm run bench -- department):
// - "the newest results of an owner's courses" (the instructor's home) sorted every version of
//   the course by created_at to keep one: 36 ms, growing with the course; walking an index on
//   created_at from the newest end stops at the first match (0.1 ms).
// - each unit's latest version (review queue, class summary, grade sheet) is read in the order
//   unit_key, version desc, which the unique (practical_id, unit_key, version) index cannot give
//   in either direction: every version was sorted first.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index if not exists submissions_created on submissions (created_at)`.execute(db)
  await sql`create index if not exists submissions_unit_latest on submissions (practical_id, unit_key, version desc)`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists submissions_unit_latest`.execute(db)
  await sql`drop index if exists submissions_created`.execute(db)
}
