import { type Kysely, sql } from 'kysely'

// Calendar feed tokens leave the database: a feed is found by the SHA-256 of its token, and the
// token itself is worked out again (an HMAC of the stored seed under a key from the server's
// secret) when its owner asks for the URL. A reset keeps the old token's hash, so the old URL
// answers 410 Gone instead of 404. Tokens stored in plain text until now keep working by their
// hash; they have no seed, so their owner is given a fresh URL the next time they ask for one.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('calendar_feeds')
    .addColumn('token_hash', 'text')
    .addColumn('token_seed', 'bytea')
    .execute()
  await sql`update calendar_feeds set token_hash = encode(sha256(convert_to(token, 'UTF8')), 'hex')`.execute(db)
  await db.schema.alterTable('calendar_feeds').alterColumn('token_hash', (c) => c.setNotNull()).execute()
  await db.schema.alterTable('calendar_feeds').addUniqueConstraint('calendar_feeds_token_hash_key', ['token_hash']).execute()
  await db.schema.alterTable('calendar_feeds').dropColumn('token').execute()

  await db.schema
    .createTable('calendar_feed_revocations')
    .addColumn('token_hash', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('revoked_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
}

// Going back cannot recover the tokens: every feed is dropped and made again on first use.
export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('calendar_feed_revocations').execute()
  await db.deleteFrom('calendar_feeds').execute()
  await db.schema.alterTable('calendar_feeds').dropConstraint('calendar_feeds_token_hash_key').execute()
  await db.schema.alterTable('calendar_feeds').dropColumn('token_hash').dropColumn('token_seed').execute()
  await db.schema.alterTable('calendar_feeds').addColumn('token', 'text', (c) => c.notNull().unique()).execute()
}
