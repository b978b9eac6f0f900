// Sign-in capacity: many simultaneous sign-ins through the running server, for accounts whose
// stored hash is argon2id (today's form) against accounts still holding the older scrypt
// N = 2^17 hash (their first sign-in verifies scrypt and stores argon2id), in the same run; and
// the two hash functions alone, side by side in this process.
import { randomBytes, scrypt } from 'node:crypto'
import { availableParallelism } from 'node:os'
import { hash as argon2Hash, verify as argon2Verify } from '@node-rs/argon2'
import pg from 'pg'

const PASSWORD = 'bench-sign-in-passphrase'
// OWASP Password Storage Cheat Sheet: argon2id m = 19456 KiB, t = 2, p = 1 (as server/utils/password.ts).
const ARGON2ID = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 }
const SCRYPT = { N: 2 ** 17, r: 8, p: 1, maxmem: 256 * 2 ** 17 * 8 }

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

function scryptKey(password, salt) {
  return new Promise((resolve, reject) => scrypt(password, salt, 32, SCRYPT, (e, k) => (e ? reject(e) : resolve(k))))
}

async function legacyHash(password) {
  const salt = randomBytes(16)
  return ['scrypt', 17, 8, 1, salt.toString('base64'), (await scryptKey(password, salt)).toString('base64')].join('$')
}

/** n accounts sharing one stored hash (the server cannot tell), with e-mails of their own. */
async function makeUsers(client, label, storedHash, n) {
  const tag = `${label}-${randomBytes(4).toString('hex')}`
  const { rows } = await client.query(`insert into users (email, name, role, password_hash)
    select 'bench-' || $1 || '-' || g || '@bench.example', 'Bench ' || g, 'student', $2 from generate_series(1, $3) g
    returning email`, [tag, storedHash, n])
  return rows.map((r) => r.email)
}

/** Every account signs in at once; all must succeed. */
async function signInAll(baseUrl, emails) {
  const started = performance.now()
  const times = await Promise.all(emails.map(async (email) => {
    const t = performance.now()
    const response = await fetch(`${baseUrl}/api/auth/login`, {
      method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: PASSWORD }),
    })
    await response.arrayBuffer()
    if (response.status !== 200) throw new Error(`sign-in ${email}: ${response.status}`)
    return performance.now() - t
  }))
  const seconds = (performance.now() - started) / 1000
  return { perSec: emails.length / seconds, medianMs: median(times), slowestMs: Math.max(...times) }
}

/** Verifications per second with `concurrency` running at once, for about `seconds`. */
async function verifyRate(verify, concurrency, seconds) {
  let done = 0
  const until = performance.now() + seconds * 1000
  const started = performance.now()
  await Promise.all(Array.from({ length: concurrency }, async () => {
    while (performance.now() < until) {
      if (!(await verify())) throw new Error('verification failed')
      done++
    }
  }))
  return done / ((performance.now() - started) / 1000)
}

export async function benchSignIn(world, { accounts = 200, seconds = 4 } = {}) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const rows = []
  try {
    const argonStored = await argon2Hash(PASSWORD, ARGON2ID)
    const scryptStored = await legacyHash(PASSWORD)
    const legacyEmails = await makeUsers(client, 'scrypt', scryptStored, accounts)
    const argonEmails = await makeUsers(client, 'argon2id', argonStored, accounts)
    // A fresh server's first requests pay for compiling and opening connections: not measured.
    await signInAll(world.baseUrl, await makeUsers(client, 'warm-up', argonStored, 40))

    const legacy = await signInAll(world.baseUrl, legacyEmails)
    const argon = await signInAll(world.baseUrl, argonEmails)
    const { rows: [left] } = await client.query(
      `select count(*)::int as n from users where email = any($1) and password_hash not like '$argon2id$%'`,
      [legacyEmails],
    )
    if (left.n !== 0) throw new Error(`${left.n} scrypt hashes were not upgraded`)
    rows.push({
      case: `${accounts} simultaneous sign-ins through the server (sign-ins/s)`,
      baseline: 'stored scrypt N=2^17 (verify, then upgrade)',
      baselinePerSec: legacy.perSec, perSec: argon.perSec, ratio: argon.perSec / legacy.perSec,
      medianMs: argon.medianMs, slowestMs: argon.slowestMs, baselineMedianMs: legacy.medianMs, baselineSlowestMs: legacy.slowestMs,
    })

    // The hash functions alone, each with as many running at once as there are cores.
    const concurrency = availableParallelism()
    const salt = randomBytes(16)
    const key = await scryptKey(PASSWORD, salt)
    const scryptRate = await verifyRate(async () => (await scryptKey(PASSWORD, salt)).equals(key), concurrency, seconds)
    const argonRate = await verifyRate(() => argon2Verify(argonStored, PASSWORD), concurrency, seconds)
    rows.push({
      case: `password verifications in one process, ${concurrency} at once (per s)`,
      baseline: 'scrypt N=2^17, r=8, p=1',
      baselinePerSec: scryptRate, perSec: argonRate, ratio: argonRate / scryptRate,
    })
  } finally {
    await client.end()
  }
  return rows
}
