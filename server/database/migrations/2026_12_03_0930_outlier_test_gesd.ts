import { type Kysely, sql } from 'kysely'

// The generalized ESD test joins the outlier tests a course can choose and becomes the default
// for new courses: it finds several bad runs at once, where repeated Grubbs' tests let two of
// them hide each other. Existing courses keep the test their instructor chose.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table courses drop constraint courses_outlier_test_check`.execute(db)
  await sql`alter table courses add constraint courses_outlier_test_check
    check (outlier_test in ('gesd', 'grubbs', 'dixon', 'modified-z'))`.execute(db)
  await sql`alter table courses alter column outlier_test set default 'gesd'`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`update courses set outlier_test = 'grubbs' where outlier_test = 'gesd'`.execute(db)
  await sql`alter table courses alter column outlier_test set default 'grubbs'`.execute(db)
  await sql`alter table courses drop constraint courses_outlier_test_check`.execute(db)
  await sql`alter table courses add constraint courses_outlier_test_check
    check (outlier_test in ('grubbs', 'dixon', 'modified-z'))`.execute(db)
}
