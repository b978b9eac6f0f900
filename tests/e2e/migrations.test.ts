import { createHash } from 'node:crypto'
import { afterAll, describe, expect, it, inject } from 'vitest'
import { sql } from 'kysely'
import { createDatabase } from '../../server/database/connection'
import { migrateToLatest } from '../../server/database/migrator'
import { migrations } from '../../server/database/migrations'
import { testDb, closeTestDb } from '../support/db'

afterAll(closeTestDb)

async function schemaSnapshot(url: string) {
  const db = createDatabase(url, { max: 1 })
  try {
    const { rows } = await sql<{ t: string, c: string, d: string, n: string }>`
      select table_name as t, column_name as c, data_type as d, is_nullable as n
      from information_schema.columns where table_schema = 'public' order by 1, 2`.execute(db)
    return rows
  } finally {
    await db.destroy()
  }
}

describe('migrations', () => {
  it('run on an empty database, and running them again changes nothing', async () => {
    const name = `migrate_check_${process.pid}`
    await sql.raw(`drop database if exists ${name}`).execute(testDb())
    await sql.raw(`create database ${name}`).execute(testDb())
    const url = inject('databaseUrl').replace(/\/[^/]+$/, `/${name}`)
    const db = createDatabase(url, { max: 1 })
    try {
      const first = await migrateToLatest(db)
      expect(first.applied).toEqual(Object.keys(migrations))
      const snapshot = await schemaSnapshot(url)
      expect(snapshot.some((r) => r.t === 'users' && r.c === 'session_version')).toBe(true)
      const second = await migrateToLatest(db)
      expect(second.applied).toEqual([])
      expect(await schemaSnapshot(url)).toEqual(snapshot)
      // New courses run the generalized ESD test; its down step restores Grubbs' test.
      const outlierDefault = async () => (await sql<{ d: string }>`
        select column_default as d from information_schema.columns where table_name = 'courses' and column_name = 'outlier_test'`.execute(db)).rows[0]!.d
      expect(await outlierDefault()).toMatch(/'gesd'/)
      const gesd = migrations['2026_12_03_0930_outlier_test_gesd']!
      await gesd.down!(db)
      expect(await outlierDefault()).toMatch(/'grubbs'/)
      await expect(sql`insert into courses (code, title, term, outlier_test) values ('X', 'X', 'X', 'gesd')`.execute(db)).rejects.toThrow(/check/)
      await gesd.up(db)
      expect(await outlierDefault()).toMatch(/'gesd'/)
      // A sign-in attempt is written before its password is checked (succeeded null meanwhile);
      // the down step counts unfinished attempts as failures and restores NOT NULL.
      const pending = migrations['2026_12_03_1000_login_attempts_pending']!
      await sql`insert into login_attempts (email, ip, succeeded) values ('someone@test.example', '127.0.0.1', null)`.execute(db)
      await pending.down!(db)
      expect((await sql`select succeeded from login_attempts`.execute(db)).rows).toEqual([{ succeeded: false }])
      await expect(sql`insert into login_attempts (email, ip, succeeded) values ('someone@test.example', '127.0.0.1', null)`.execute(db)).rejects.toThrow(/null/)
      await pending.up(db)
      // Calendar tokens stored in plain text become their SHA-256; the text itself is dropped.
      const feeds = migrations['2026_12_03_1210_calendar_feed_hashes']!
      const plain = db.withoutPlugins()
      await feeds.down!(plain)
      const { id } = (await sql<{ id: number }>`insert into users (email, name, role) values ('feed@test.example', 'Feed', 'student') returning id`.execute(db)).rows[0]!
      await sql`insert into calendar_feeds (user_id, token) values (${id}, ${'T'.repeat(43)})`.execute(db)
      await feeds.up(plain)
      const feed = (await sql<Record<string, unknown>>`select * from calendar_feeds where user_id = ${id}`.execute(plain)).rows[0]!
      expect(feed.token_hash).toBe(createHash('sha256').update('T'.repeat(43)).digest('hex'))
      expect(feed.token_seed).toBeNull()
      expect(Object.keys(feed)).not.toContain('token')
      expect(await schemaSnapshot(url)).toEqual(snapshot)
    } finally {
      await db.destroy()
      await sql.raw(`drop database if exists ${name}`).execute(testDb())
    }
  })

  it('are registered in name order, named by date', () => {
    const names = Object.keys(migrations)
    expect([...names].sort()).toEqual(names)
    for (const name of names) expect(name).toMatch(/^\d{4}_\d{2}_\d{2}_\d{4}_[a-z0-9_]+$/)
  })
})
