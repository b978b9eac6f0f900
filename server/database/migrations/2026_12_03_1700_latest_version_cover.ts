import { type Kysely, sql } from 'kysely'

// Found with EXPLAIN (ANALYZE, BUFFERS) on the department benchmark's term (80 sections, 2,000
// units and about 4,900 versions per practical): choosing each unit's latest version read every
// version's heap row (about 1,600 pages, three wide rows to a page: the peaks and result travel
// with them) and sorted them, 25-40 ms a practical, on every review queue, submission page, home
// card and grade sheet. The same index with the columns that choice and the outlier test read
// carried along is read alone (an index-only scan, about 55 pages, 2 ms), and it serves
// everything the plain (practical_id, unit_key, version desc) index did, which it replaces.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index if not exists submissions_latest_cover on submissions (practical_id, unit_key, version desc)
    include (id, section_id, status, excluded_at, factor_secondary, factor_tertiary)`.execute(db)
  await sql`drop index if exists submissions_unit_latest`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`create index if not exists submissions_unit_latest on submissions (practical_id, unit_key, version desc)`.execute(db)
  await sql`drop index if exists submissions_latest_cover`.execute(db)
}
