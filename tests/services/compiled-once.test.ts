import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { closeTestDb, testDb } from '../support/db'
import { compiledOnce } from '../../server/utils/db'

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
