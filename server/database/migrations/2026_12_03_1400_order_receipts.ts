import { type Kysely, sql } from 'kysely'

// Orders arrive in parts. Each delivery of a line is a receipt (how many containers, when, the
// lot it made); an order is received when every line has come, or when the coordinator closes
// what is still open with a reason, which is kept. Sheets gain notes that never leave the
// building, proposed item links the coordinator dismissed are remembered, and mail gains
// Reply-To and a copy, so a supplier's answer reaches the coordinator.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('order_receipts')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('order_line_id', 'integer', (c) => c.notNull().references('order_lines.id').onDelete('cascade'))
    .addColumn('received_on', 'date', (c) => c.notNull())
    .addColumn('containers', 'integer', (c) => c.notNull().check(sql`containers > 0`))
    .addColumn('lot_id', 'integer', (c) => c.references('reagent_lots.id').onDelete('set null'))
    .addColumn('received_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('order_receipts_line').on('order_receipts').column('order_line_id').execute()
  // What older sheets received in one go: every line in full, on the sheet's date.
  await sql`insert into order_receipts (order_line_id, received_on, containers, received_by)
    select l.id, s.received_on, l.containers, s.received_by from order_lines l join order_sheets s on s.id = l.order_id
    where s.status = 'received' and s.received_on is not null`.execute(db)

  await db.schema.alterTable('order_sheets')
    .addColumn('internal_notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('closed_reason', 'text')
    .addColumn('closed_at', 'timestamptz')
    .addColumn('closed_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .execute()

  // A proposed link (item to reagent) the coordinator said is wrong: not proposed again.
  await db.schema
    .createTable('item_link_dismissals')
    .addColumn('practical_item_id', 'integer', (c) => c.notNull().references('practical_items.id').onDelete('cascade'))
    .addColumn('reagent_id', 'integer', (c) => c.notNull().references('reagents.id').onDelete('cascade'))
    .addColumn('dismissed_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('dismissed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('item_link_dismissals_pkey', ['practical_item_id', 'reagent_id'])
    .execute()

  await db.schema.alterTable('mail_messages')
    .addColumn('reply_to', 'text')
    .addColumn('cc_addresses', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'::text[]`))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('mail_messages').dropColumn('reply_to').dropColumn('cc_addresses').execute()
  await db.schema.alterTable('order_sheets')
    .dropColumn('internal_notes').dropColumn('closed_reason').dropColumn('closed_at').dropColumn('closed_by').execute()
  await db.schema.dropTable('item_link_dismissals').execute()
  await db.schema.dropTable('order_receipts').execute()
}
