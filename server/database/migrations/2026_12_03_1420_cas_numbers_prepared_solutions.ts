import { type Kysely, sql } from 'kysely'

// CAS Registry Numbers on catalog reagents, practical items and library substrates (optional; the
// stockroom proposes links on them), and a practical item made up from a stocked solid is
// described as a percent w/v solution of it (g per 100 mL) instead of a bare g/mL figure.

export async function up(db: Kysely<any>): Promise<void> {
  for (const table of ['reagents', 'practical_items', 'substrates']) {
    await db.schema.alterTable(table).addColumn('cas_number', 'text').execute()
  }
  await db.schema.createIndex('reagents_cas_number').on('reagents').column('cas_number').execute()
  await db.schema.alterTable('practical_items')
    .addColumn('solution_percent_wv', 'numeric', (c) => c.check(sql`solution_percent_wv > 0 and solution_percent_wv <= 100`))
    .execute()
  // g/mL x 100 = g per 100 mL; a figure above 1 g/mL is no w/v solution and is dropped.
  await sql`update practical_items set solution_percent_wv = reagent_grams_per_ml * 100
            where reagent_grams_per_ml is not null and reagent_grams_per_ml <= 1`.execute(db)
  await db.schema.alterTable('practical_items').dropColumn('reagent_grams_per_ml').execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('practical_items')
    .addColumn('reagent_grams_per_ml', 'numeric', (c) => c.check(sql`reagent_grams_per_ml > 0`))
    .execute()
  await sql`update practical_items set reagent_grams_per_ml = solution_percent_wv / 100 where solution_percent_wv is not null`.execute(db)
  await db.schema.alterTable('practical_items').dropColumn('solution_percent_wv').execute()
  await db.schema.dropIndex('reagents_cas_number').execute()
  for (const table of ['reagents', 'practical_items', 'substrates']) {
    await db.schema.alterTable(table).dropColumn('cas_number').execute()
  }
}
