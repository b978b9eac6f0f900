import { type Kysely, sql } from 'kysely'

const now = sql`now()`

// The stockroom: the reagent catalog with its hazard data, stock lots and what was taken from
// them, the link from a practical's items to the catalog, and order sheets.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('reagents')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('name', 'text', (c) => c.notNull())
    // Canonical when given; the formula and molar mass are then worked out from it.
    .addColumn('smiles', 'text')
    .addColumn('formula', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('molar_mass', 'numeric', (c) => c.check(sql`molar_mass > 0`))
    .addColumn('physical_state', 'text', (c) => c.notNull().check(sql`physical_state in ('solid', 'liquid', 'gas', 'solution')`))
    .addColumn('density', 'numeric', (c) => c.check(sql`density > 0`))
    // What one container holds, in the unit stock is kept in: g (solids, gas cylinders by mass) or mL.
    .addColumn('container_size', 'numeric', (c) => c.notNull().check(sql`container_size > 0`))
    .addColumn('unit', 'text', (c) => c.notNull().check(sql`unit in ('g', 'mL')`))
    .addColumn('supplier_name', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('supplier_email', 'text')
    .addColumn('catalog_number', 'text', (c) => c.notNull().defaultTo(''))
    // GHS (an open standard); the product asks to confirm both against the supplier's SDS.
    .addColumn('signal_word', 'text', (c) => c.check(sql`signal_word in ('Danger', 'Warning')`))
    .addColumn('hazard_codes', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    // Keys of the product's cautions (chlorine, sulfuryl-chloride, azo-initiator …).
    .addColumn('hazards', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .addColumn('storage_notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('shelf_life_months', 'integer', (c) => c.check(sql`shelf_life_months > 0`))
    .addColumn('overage_percent', 'numeric', (c) => c.notNull().defaultTo(15).check(sql`overage_percent >= 0 and overage_percent <= 200`))
    .addColumn('low_stock_level', 'numeric', (c) => c.check(sql`low_stock_level >= 0`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('reagents_gas_by_mass', sql`physical_state <> 'gas' or unit = 'g'`)
    .execute()
  await db.schema.createIndex('reagents_name').on('reagents').expression(sql`lower(name)`).unique().execute()

  await db.schema
    .createTable('order_sheets')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('draft').check(sql`status in ('draft', 'sent', 'received')`))
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    // The forecast range a sheet was drawn from, when it was.
    .addColumn('forecast_from', 'date')
    .addColumn('forecast_to', 'date')
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('sent_at', 'timestamptz')
    .addColumn('sent_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('received_on', 'date')
    .addColumn('received_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()
  await db.schema.createIndex('order_sheets_status').on('order_sheets').columns(['status', 'created_at']).execute()

  await db.schema
    .createTable('order_lines')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('order_id', 'integer', (c) => c.notNull().references('order_sheets.id').onDelete('cascade'))
    .addColumn('position', 'smallint', (c) => c.notNull())
    // null: an article outside the catalog (a waste container); receiving it makes no lot.
    .addColumn('reagent_id', 'integer', (c) => c.references('reagents.id').onDelete('set null'))
    // Copied from the catalog when the line is made, so a sent sheet keeps what was asked for.
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('supplier_name', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('supplier_email', 'text')
    .addColumn('catalog_number', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('containers', 'integer', (c) => c.notNull().check(sql`containers > 0`))
    .addColumn('container_size', 'numeric', (c) => c.notNull().check(sql`container_size > 0`))
    .addColumn('unit', 'text', (c) => c.notNull().check(sql`unit in ('g', 'mL', 'each')`))
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .execute()
  await db.schema.createIndex('order_lines_order').on('order_lines').columns(['order_id', 'position']).execute()

  await db.schema
    .createTable('reagent_lots')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('reagent_id', 'integer', (c) => c.notNull().references('reagents.id').onDelete('cascade'))
    // The supplier's lot or batch number, as printed on the label.
    .addColumn('lot_code', 'text', (c) => c.notNull().defaultTo(''))
    // As received; what is left is this minus the usage recorded against the lot.
    .addColumn('quantity', 'numeric', (c) => c.notNull().check(sql`quantity > 0`))
    .addColumn('unit', 'text', (c) => c.notNull().check(sql`unit in ('g', 'mL')`))
    .addColumn('containers', 'integer', (c) => c.notNull().defaultTo(1).check(sql`containers > 0`))
    .addColumn('location', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('received_on', 'date', (c) => c.notNull())
    .addColumn('opened_on', 'date')
    .addColumn('expires_on', 'date')
    .addColumn('order_line_id', 'integer', (c) => c.references('order_lines.id').onDelete('set null'))
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()
  await db.schema.createIndex('reagent_lots_reagent').on('reagent_lots').columns(['reagent_id', 'expires_on']).execute()

  await db.schema
    .createTable('reagent_usage')
    .addColumn('id', 'integer', (c) => c.primaryKey().generatedAlwaysAsIdentity())
    .addColumn('lot_id', 'integer', (c) => c.notNull().references('reagent_lots.id').onDelete('cascade'))
    .addColumn('used_on', 'date', (c) => c.notNull())
    // In the lot's unit.
    .addColumn('amount', 'numeric', (c) => c.notNull().check(sql`amount > 0`))
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('practical_id', 'integer', (c) => c.references('practicals.id').onDelete('set null'))
    .addColumn('recorded_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()
  await db.schema.createIndex('reagent_usage_lot').on('reagent_usage').columns(['lot_id', 'used_on']).execute()

  // One row: the stockroom's own settings.
  await db.schema
    .createTable('stockroom_settings')
    .addColumn('id', 'smallint', (c) => c.primaryKey().defaultTo(1).check(sql`id = 1`))
    // Halogenated waste per work unit beyond the organic liquids of the procedure (rinses, GC vials).
    .addColumn('rinse_ml_per_unit', 'numeric', (c) => c.notNull().defaultTo(10).check(sql`rinse_ml_per_unit >= 0`))
    // Printed on purchase requests.
    .addColumn('deliver_to', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(now))
    .execute()
  await db.insertInto('stockroom_settings').values({ id: 1 }).execute()

  // Which catalog reagent a practical's item draws on. grams_per_ml: the item is a solution
  // made up from a stocked solid (5 % w/v bicarbonate is 0.05 g of the solid per mL).
  await db.schema.alterTable('practical_items')
    .addColumn('reagent_id', 'integer', (c) => c.references('reagents.id').onDelete('set null'))
    .execute()
  await db.schema.alterTable('practical_items')
    .addColumn('reagent_grams_per_ml', 'numeric', (c) => c.check(sql`reagent_grams_per_ml > 0`))
    .execute()
  await db.schema.createIndex('practical_items_reagent').on('practical_items').column('reagent_id').execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropIndex('practical_items_reagent').execute()
  await db.schema.alterTable('practical_items').dropColumn('reagent_grams_per_ml').execute()
  await db.schema.alterTable('practical_items').dropColumn('reagent_id').execute()
  for (const table of ['stockroom_settings', 'reagent_usage', 'reagent_lots', 'order_lines', 'order_sheets', 'reagents']) {
    await db.schema.dropTable(table).execute()
  }
}
