import { type Kysely, sql } from 'kysely'

// An upload stores its original bytes (files.content, up to 2 MB) and its parsed peaks
// (submissions.parsed, thousands for a long table) in one transaction. PostgreSQL's default
// TOAST compression, pglz, took most of that transaction: measured on the upload benchmark's
// files (npm run bench -- uploads), a 1.5 MB trace's insert and commit went from about 77-95 ms
// to 18-48 ms with lz4, which stores them about 30 % larger. Existing values keep their
// compression until rewritten. A server built without lz4 has no such choice: nothing changes.
async function hasLz4(db: Kysely<any>): Promise<boolean> {
  const { rows } = await sql<{ lz4: boolean }>`
    select 'lz4' = any(enumvals) as lz4 from pg_settings where name = 'default_toast_compression'`.execute(db)
  return rows[0]?.lz4 === true
}

export async function up(db: Kysely<any>): Promise<void> {
  if (!(await hasLz4(db))) return
  await sql`alter table files alter column content set compression lz4`.execute(db)
  await sql`alter table submissions alter column parsed set compression lz4`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`alter table files alter column content set compression default`.execute(db)
  await sql`alter table submissions alter column parsed set compression default`.execute(db)
}
