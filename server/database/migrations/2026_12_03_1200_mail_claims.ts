import { type Kysely, sql } from 'kysely'

// Which server process is sending a message, so a process that starts after a crash can tell a
// message held by a dead sender (send it again) from one still in a live sender's hands.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('mail_messages')
    // The sender's presence key (an advisory lock it holds while it lives); null when nobody holds it.
    .addColumn('claimed_by', 'integer')
    .addColumn('claimed_at', 'timestamptz')
    // Attempts whose outcome could not be known (the sender stopped before recording it): the
    // next attempt went out with the same Message-ID, so the receiving side can drop a copy.
    .addColumn('unknown_outcomes', 'integer', (c) => c.notNull().defaultTo(0))
    .execute()
  await db.schema.createIndex('mail_messages_sending').on('mail_messages').column('claimed_by')
    .where(sql<boolean>`status = 'sending'`).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropIndex('mail_messages_sending').execute()
  await db.schema.alterTable('mail_messages').dropColumn('claimed_by').dropColumn('claimed_at').dropColumn('unknown_outcomes').execute()
}
