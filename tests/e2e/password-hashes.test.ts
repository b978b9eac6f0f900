import { randomBytes, randomUUID, scryptSync } from 'node:crypto'
import { afterAll, describe, expect, it } from 'vitest'
import { Client, signedIn } from '../support/http'
import { closeTestDb, createUser, testDb } from '../support/db'
import { demoPeople } from '../../server/database/seed/people'

afterAll(closeTestDb)

// The stored form before argon2id: scrypt N = 2^17, r = 8, p = 1, written here with
// node:crypto alone so the test does not depend on the code under test.
const LEGACY_PASSWORD = 'an-old-scrypt-passphrase'
let legacyHash: string | undefined
function legacyScryptHash() {
  if (!legacyHash) {
    const salt = randomBytes(16)
    const key = scryptSync(LEGACY_PASSWORD.normalize('NFKC'), salt, 32, { N: 2 ** 17, r: 8, p: 1, maxmem: 256 * 2 ** 17 * 8 })
    legacyHash = ['scrypt', 17, 8, 1, salt.toString('base64'), key.toString('base64')].join('$')
  }
  return legacyHash
}

// OWASP Password Storage Cheat Sheet: argon2id with m = 19 MiB (19456 KiB), t = 2, p = 1.
const ARGON2ID_OWASP = /^\$argon2id\$v=19\$m=19456,t=2,p=1\$[A-Za-z0-9+/]{22}\$[A-Za-z0-9+/]{43}$/

async function legacyUser() {
  return testDb().insertInto('users')
    .values({ email: `legacy-${randomUUID().slice(0, 8)}@test.example`, name: 'Old Hash', role: 'student', passwordHash: legacyScryptHash() })
    .returning(['id', 'email']).executeTakeFirstOrThrow()
}

async function storedHash(id: number) {
  return (await testDb().selectFrom('users').select('passwordHash').where('id', '=', id).executeTakeFirstOrThrow()).passwordHash
}

const login = (email: string, password: string) => new Client().post('/api/auth/login', { email, password })

describe('password hashes', () => {
  it('signs in a user with an old scrypt hash and stores argon2id in its place', async () => {
    const user = await legacyUser()
    const reply = await login(user.email, LEGACY_PASSWORD)
    expect(reply.status).toBe(200)
    expect(reply.body.user).toMatchObject({ id: user.id, email: user.email })
    const upgraded = await storedHash(user.id)
    expect(upgraded).toMatch(ARGON2ID_OWASP)
    // The new hash takes the same password, and only that one.
    expect((await login(user.email, LEGACY_PASSWORD)).status).toBe(200)
    expect((await login(user.email, 'an-old-scrypt-passphrasE')).status).toBe(401)
    expect(await storedHash(user.id)).toBe(upgraded)
  })

  it('answers a wrong password for a scrypt user with the usual 401 and leaves the hash alone', async () => {
    const user = await legacyUser()
    const wrong = await login(user.email, 'not-the-old-passphrase')
    const unknown = await login(`nobody-${randomUUID().slice(0, 8)}@test.example`, 'not-the-old-passphrase')
    expect(wrong.status).toBe(401)
    expect(wrong.refusal.statusMessage).toBe(unknown.refusal.statusMessage)
    expect(await storedHash(user.id)).toBe(legacyScryptHash())
    const attempts = await testDb().selectFrom('loginAttempts').select('succeeded').where('email', '=', user.email).execute()
    expect(attempts.map((a) => a.succeeded)).toEqual([false])
  })

  it('stores argon2id for a changed password', async () => {
    const user = await createUser('ta')
    const client = await signedIn(user.email, user.password)
    const change = await client.post('/api/account/password', { currentPassword: user.password, newPassword: 'another-long-passphrase' })
    expect(change.status).toBe(204)
    expect(await storedHash(user.id)).toMatch(ARGON2ID_OWASP)
  })

  it('counts wrong current passwords on the password change against the account limit', async () => {
    const user = await createUser('ta')
    const client = await signedIn(user.email, user.password)
    const replies = await Promise.all(Array.from({ length: 12 }, (_, i) =>
      client.post('/api/account/password', { currentPassword: `wrong-current-${i}`, newPassword: 'a-fine-long-passphrase' })))
    const statuses = replies.map((r) => r.status)
    expect(statuses.filter((s) => s === 422).length).toBeLessThanOrEqual(10)
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(2)
    expect(statuses.filter((s) => s !== 422 && s !== 429)).toEqual([])
  })

  it('gives the demo accounts hashes of their own', async () => {
    const emails = demoPeople().map((p) => p.email)
    const rows = await testDb().selectFrom('users').select('passwordHash').where('email', 'in', emails).execute()
    expect(rows.length).toBe(emails.length)
    for (const row of rows) expect(row.passwordHash).toMatch(ARGON2ID_OWASP)
    expect(new Set(rows.map((r) => r.passwordHash)).size).toBe(emails.length)
  })
})
