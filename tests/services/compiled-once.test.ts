import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { closeTestDb, testDb } from '../support/db'
import { compiledOnce, textOnceCompiled } from '../../server/utils/db'

afterAll(closeTestDb)

// A statement compiled once per shape must still answer each call with that call's values:
// a value baked into the text would answer every later caller with the first one's rows.
describe('compiledOnce', () => {
  const read = compiledOnce((db, shape: 'ids' | 'ids and more', ids: number[], floor: number) => (shape === 'ids'
    ? sql<{ n: number }>`select n from unnest(${ids}::int[]) n where n >= ${floor} order by n`
    : db.selectNoFrom(sql<number>`${floor}::int`.as('n'))))

  it('sends each call its own values, a list as one parameter', async () => {
    expect(await read(testDb(), 'ids', [3, 1, 2], 2)).toEqual([{ n: 2 }, { n: 3 }])
    expect(await read(testDb(), 'ids', [7, 5], 0)).toEqual([{ n: 5 }, { n: 7 }])
    expect(await read(testDb(), 'ids and more', [], 9)).toEqual([{ n: 9 }])
    expect(await read(testDb(), 'ids', [4], 5)).toEqual([])
  })

  it('refuses a statement that writes a value into its text', async () => {
    const leaky = compiledOnce((_db, _shape: 'one', id: number) => sql<{ n: number }>`select ${sql.lit(id)}::int as n`)
    await expect(leaky(testDb(), 'one', 4)).rejects.toThrow('a value was written into the SQL text')
  })
})

// The same read prepared once per pooled connection (named by its text) and, in a transaction,
// sent through Kysely: each call its own values, each shape its own statement, null for none.
describe('textOnceCompiled', () => {
  const read = textOnceCompiled((_db, shape: 'list' | 'first', ids: number[], floor: number) => (shape === 'list'
    ? sql<{ text: string | null }>`select string_agg(n::text, ',' order by n) as text from unnest(${ids}::int[]) n where n >= ${floor}`
    : sql<{ text: string | null }>`select min(n)::text as text from unnest(${ids}::int[]) n where n >= ${floor}`))

  it('answers each call on the pool with its own values, again and again on the same connections', async () => {
    for (let i = 0; i < 4; i++) {
      expect(await read(testDb(), 'list', [3, 1, 2], 2)).toBe('2,3')
      expect(await read(testDb(), 'first', [3, 1, 2], 2)).toBe('2')
      expect(await read(testDb(), 'list', [7, 5, 9], 6 + i)).toBe(['7,9', '7,9', '9', '9'][i])
      expect(await read(testDb(), 'list', [4], 5)).toBeNull()
    }
  })

  it('answers the same inside a transaction', async () => {
    await testDb().transaction().execute(async (trx) => {
      expect(await read(trx, 'list', [8, 6], 0)).toBe('6,8')
      expect(await read(trx, 'first', [8, 6], 7)).toBe('8')
    })
  })
})
