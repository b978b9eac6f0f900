import { randomUUID } from 'node:crypto'
import { afterAll, describe, expect, it } from 'vitest'
import { Client, type Reply } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { postFrom } from '../support/loopback'

afterAll(closeTestDb)

// The test server runs with the default limits: 10 failures per account, 100 per address,
// in 15 minutes.
const ACCOUNT_LIMIT = 10
const ADDRESS_LIMIT = 100

const login = (email: string, password: string) => new Client().post('/api/auth/login', { email, password })

function tally(replies: Reply<unknown>[]) {
  const checked = replies.filter((r) => r.status === 401)
  const refused = replies.filter((r) => r.status === 429)
  return { checked: checked.length, refused }
}

async function attemptsOf(column: 'email' | 'ip', value: string) {
  return testDb().selectFrom('loginAttempts').select('succeeded').where(column, '=', value).execute()
}

describe('sign-in limits hold for simultaneous attempts', () => {
  it('checks at most 10 of 12 simultaneous wrong passwords for one account; the others get 429', async () => {
    const victim = await createUser('student')
    const replies = await Promise.all(Array.from({ length: 12 }, (_, i) => login(victim.email, `wrong-guess-${i}`)))
    const { checked, refused } = tally(replies)
    expect(checked + refused.length).toBe(12)
    expect(checked).toBeLessThanOrEqual(ACCOUNT_LIMIT)
    expect(refused.length).toBeGreaterThanOrEqual(2)
    for (const reply of refused) {
      expect(Number(reply.headers.get('retry-after'))).toBeGreaterThan(0)
      expect(reply.refusal.statusMessage).toMatch(/^Too many sign-in attempts\. Try again in \d+ min\.$/)
    }
    // One settled row per checked attempt: none left pending, none for the refused ones.
    expect((await attemptsOf('email', victim.email)).map((r) => r.succeeded)).toEqual(Array(checked).fill(false))
  })

  it('checks at most 100 simultaneous failures from one address, across accounts; another address is unaffected', async () => {
    const run = randomUUID().slice(0, 8)
    const replies = await Promise.all(Array.from({ length: ADDRESS_LIMIT + 12 }, (_, i) =>
      postFrom('127.0.0.2', '/api/auth/login', { email: `nobody-${run}-${i}@test.example`, password: 'not-a-real-password' })))
    const { checked, refused } = tally(replies)
    expect(checked + refused.length).toBe(ADDRESS_LIMIT + 12)
    expect(checked).toBeLessThanOrEqual(ADDRESS_LIMIT)
    expect(refused.length).toBeGreaterThanOrEqual(12)
    expect(Number(refused[0]!.headers.get('retry-after'))).toBeGreaterThan(0)
    expect((await attemptsOf('ip', '127.0.0.2')).filter((r) => r.succeeded === false)).toHaveLength(checked)

    const user = await createUser('student')
    const elsewhere = await postFrom('127.0.0.3', '/api/auth/login', { email: user.email, password: user.password })
    expect(elsewhere.status).toBe(200)
    const blocked = await postFrom('127.0.0.2', '/api/auth/login', { email: user.email, password: user.password })
    expect(blocked.status).toBe(429)
  })

  it('a successful sign-in clears the account count', async () => {
    const user = await createUser('student')
    for (let i = 0; i < ACCOUNT_LIMIT - 1; i++) expect((await login(user.email, `wrong-${i}`)).status).toBe(401)
    expect((await login(user.email, user.password)).status).toBe(200)
    const again = await Promise.all(Array.from({ length: ACCOUNT_LIMIT }, (_, i) => login(user.email, `wrong-again-${i}`)))
    expect(again.map((r) => r.status)).toEqual(Array(ACCOUNT_LIMIT).fill(401))
    expect((await login(user.email, user.password)).status).toBe(429)
  })

  it('gives unknown e-mails, accounts without a password and wrong passwords the same 401', async () => {
    const user = await createUser('student')
    const invited = await testDb().insertInto('users')
      .values({ email: `invited-${randomUUID().slice(0, 8)}@test.example`, name: 'Not Yet', role: 'student', passwordHash: null })
      .returning('email').executeTakeFirstOrThrow()
    const replies = await Promise.all([
      login(user.email, 'not-the-password'),
      login(`nobody-${randomUUID().slice(0, 8)}@test.example`, 'not-the-password'),
      login(invited.email, 'not-the-password'),
    ])
    expect(replies.map((r) => r.status)).toEqual([401, 401, 401])
    expect(new Set(replies.map((r) => r.refusal.statusMessage)).size).toBe(1)
  })
})
