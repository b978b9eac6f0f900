import { type Kysely, sql } from 'kysely'

// What a substrate's products are called, and what its product mixture really looks like.
//   substrate_product_names   an instructor's name for one product of one substrate (the
//                             built-in names cover the teaching substrates without a row)
//   substrate_references      a reference distribution (mol % per product) for one substrate
//                             and one reagent family, with where it comes from: the class model
//                             ignores what a halogen already on the chain does to its neighbours
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('substrate_product_names')
    .addColumn('substrate_id', 'integer', (c) => c.notNull().references('substrates.id').onDelete('cascade'))
    .addColumn('product_smiles', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(name) between 1 and 120`))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('substrate_product_names_pk', ['substrate_id', 'product_smiles'])
    .execute()

  await db.schema
    .createTable('substrate_references')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('substrate_id', 'integer', (c) => c.notNull().references('substrates.id').onDelete('cascade'))
    // The reagent family of methods.reagent: the distribution depends on the reagent, not on one method row.
    .addColumn('reagent', 'text', (c) => c.notNull().check(sql`reagent in ('cl2-light', 'so2cl2-azo', 'br2-light', 'nbs')`))
    // [{ "smiles": canonical product SMILES, "percent": mol % }], one entry per product.
    .addColumn('percents', 'jsonb', (c) => c.notNull())
    .addColumn('source', 'text', (c) => c.notNull().check(sql`length(source) between 1 and 500`))
    .addColumn('source_kind', 'text', (c) => c.notNull().check(sql`source_kind in ('published', 'from-memory', 'course-results', 'other')`))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('substrate_references_reagent', ['substrate_id', 'reagent'])
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('substrate_references').execute()
  await db.schema.dropTable('substrate_product_names').execute()
}
